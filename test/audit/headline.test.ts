// One coherent headline, on hand-made Vellmoor networks: a wide gap two patterns share counts once for the
// network and once on each pattern, the same on the card, the histogram, the CSV and summary.json; a timing
// point where no one boards or alights sits mid-gap without splitting it anywhere (stops.csv, the page's
// stop list, candidates); a stop's own verdict and its gaps' verdicts are separate columns; and the
// passenger-minutes at stake hold the proposed additions beside the optimiser's removals.
import { describe, expect, it } from 'vitest';
import type { Feed, Stop } from '../../src/gtfs/types.js';
import type { Pattern } from '../../src/network/types.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { stopsCsv, patternsCsv } from '../../src/report/csv.js';
import { summaryObject } from '../../src/report/summaryJson.js';
import { indexHtml, pageData } from '../../src/report/html/indexHtml.js';
import { stopPointsGeoJson } from '../../src/report/geojson.js';
import { assembleFeed, handPattern, routesAtStopOf } from '../helpers/feedObject.js';
import { parse } from 'csv-parse/sync';
import { evaluateScenario } from '../../src/whatif/whatif.js';
import { programmeScenario } from '../../src/audit/programme.js';

const LAT0 = 52.1;
const M_PER_DEG_LAT = 111_320;
const stopAt = (id: string, eastM: number, northM = 0): Stop => ({
  id,
  code: '',
  name: `Vellmoor ${id}`,
  lat: LAT0 + northM / M_PER_DEG_LAT,
  lon: 4.3 + eastM / (M_PER_DEG_LAT * Math.cos((LAT0 * Math.PI) / 180)),
  locationType: 0,
  parentStation: '',
});

interface Line {
  id: string;
  route: string;
  stops: string[];
  distM: number[];
  trips?: number;
  /** Positions in the pattern passed without service (pickup_type=1 and drop_off_type=1). */
  timingOnly?: number[];
}

/** A feed and pattern set from stops along a street and the patterns that call at them (4 m/s run times). */
function network(
  stops: Stop[],
  lines: Line[],
): { feed: Feed; patterns: { date: string; patterns: Pattern[]; routesAtStop: Map<number, Set<string>> } } {
  const index = new Map(stops.map((s, i) => [s.id, i]));
  const pats = lines.map((l) =>
    handPattern({
      id: l.id,
      routeId: l.route,
      headsign: `${l.route} Harbour`,
      tripIds: Array.from({ length: l.trips ?? 60 }, (_, k) => `${l.id}-t${k}`),
      stopIdx: l.stops.map((s) => index.get(s)!),
      distAlongM: l.distM,
      gapRunTimeS: l.distM.slice(1).map((x, j) => (x - l.distM[j]) / 4),
      passengerStop: l.stops.map((_, j) => !(l.timingOnly ?? []).includes(j)),
    }),
  );
  const routes = [...new Set(lines.map((l) => l.route))].map((id) => ({
    id,
    agencyId: 'VT',
    shortName: id,
    longName: `${id} line`,
    type: 3,
  }));
  const feed = assembleFeed({
    source: 'vellmoor-headline',
    date: '2026-10-14',
    contentHash: '0'.repeat(64),
    routes,
    stops,
    trips: [],
    shapes: [],
    calendar: [],
    feedInfo: { publisherName: 'Vellmoor Transit', version: 'hand-1', startDate: '20260901', endDate: '20261231' },
  });
  return { feed, patterns: { date: '2026-10-14', patterns: pats, routesAtStop: routesAtStopOf(pats) } };
}

/** Distances along: `n` stops every 250 m (long enough that the band sits about 180 to 330 m), with the gaps named in `gapsM` (gap k after stop k) set apart. */
function along(n: number, gapsM: Record<number, number> = {}): number[] {
  const d = [0];
  for (let k = 0; k + 1 < n; k++) d.push(d[k] + (gapsM[k] ?? 250));
  return d;
}
const ids = (prefix: string, n: number, from = 0): string[] => Array.from({ length: n }, (_, k) => `${prefix}${from + k}`);

const rows = (text: string): Record<string, string>[] =>
  parse(text, { columns: true, record_delimiter: '\r\n' }) as Record<string, string>[];
const GEN = '2026-01-01T00:00:00Z';

describe('one count of wide gaps', () => {
  // route A along a street every 250 m with one 900 m gap (s10 to s11); route B comes from a street 500 m
  // north, runs along A's from s9 to s12 (the same gap, no stop of its own between) and leaves again: one
  // gap between the same two stops, run by two patterns
  // route Z crosses the gap's middle on a north-south street, its stop z14 100 m from the site: the
  // evidence that people are there, so a stop is proposed in the gap
  const a = along(30, { 10: 900 });
  const stops = [
    ...a.map((d, k) => stopAt(`s${k}`, d)),
    ...ids('b', 25).map((id, k) => stopAt(id, (k < 15 ? k - 15 : k - 15 + 6) * 250 + 2250, 500)),
    ...ids('z', 30).map((id, k) => stopAt(id, a[10] + 450, 100 + (14 - k) * 250)),
  ];
  const bIds = [...ids('b', 15), 's9', 's10', 's11', 's12', ...ids('b', 10, 15)];
  const { feed, patterns } = network(stops, [
    { id: 'A:0:1', route: 'A', stops: ids('s', 30), distM: a },
    { id: 'B:0:1', route: 'B', stops: bIds, distM: along(bIds.length, { 16: 900 }) },
    { id: 'Z:0:1', route: 'Z', stops: ids('z', 30), distM: along(30) },
  ]);
  const r = runAudit(feed, patterns, { generatedAt: GEN });

  it('counts the shared gap once for the network and once on each pattern', () => {
    expect(r.patterns.map((p) => p.wideGaps)).toEqual([1, 1, 0]);
    expect(r.headline.wideGaps).toBe(1);
    expect(r.headline.wideGapsOnPatterns).toBe(2);
    expect(r.gaps.filter((g) => g.verdict === 'wide').map((g) => `${g.fromStopId}>${g.toStopId}`)).toEqual(['s10>s11', 's10>s11']);
  });

  it('says the same in summary.json, patterns.csv, the card and the histogram', () => {
    const sum = summaryObject(r) as { headline: Record<string, number>; sensitivity: { label: string; wide_gaps: number }[] };
    expect(sum.headline.wide_gaps).toBe(1);
    expect(sum.headline.wide_gaps_on_patterns).toBe(2);
    // the base walk weight and band at 5 %: the case repeats the base audit, so it counts as the headline does
    expect(sum.sensitivity.find((s) => s.label === 'band_tolerance=0.05')!.wide_gaps).toBe(1);
    expect(rows(patternsCsv(r)).map((p) => Number(p.wide_gaps))).toEqual([1, 1, 0]);
    const html = indexHtml(r);
    expect(html).toContain('1 wide gap (each pair of stops once; 2 counted on each pattern that runs them)');
    expect(html).toMatch(/and 2 are wide \(blue, long walks with no local serving them\): the 1 wide gap of the headline/);
    // the histogram's blue parts are those gaps, no more
    const hist = html.slice(html.indexOf('<svg class="chart"'), html.indexOf('</svg>'));
    expect([...hist.matchAll(/: (\d+) wide<\/title>/g)].reduce((n, m) => n + Number(m[1]), 0)).toBe(2);
  });

  it('puts the proposed stop in the gap into the passenger-minutes at stake, as whatif weighs it on each pattern', () => {
    const adds = r.candidates.filter((c) => c.action === 'add');
    expect(adds.map((c) => [c.fromStopId, c.toStopId])).toEqual([['s10', 's11']]);
    // whatif of the addition, weighed afresh: its effect on each pattern is minus what that pattern has at stake
    const w = evaluateScenario(feed, patterns, programmeScenario(adds), {});
    for (const p of r.patterns) {
      const e = w.patterns.find((x) => x.patternId === p.patternId);
      expect(p.paxMinAdditionsPerDay, p.patternId).toBeCloseTo(e ? -e.netPaxMinPerDay : 0, 9);
      expect(p.paxMinAtStakePerDay).toBeCloseTo(p.paxMinLostPerDay + p.paxMinAdditionsPerDay, 9);
    }
    expect(r.headline.paxMinAdditionsPerDay).toBeGreaterThan(0);
    expect(r.headline.paxMinAdditionsPerDay).toBeCloseTo(-w.totals.netPaxMinPerDay, 9);
    expect(r.headline.paxMinAtStakePerDay).toBeCloseTo(r.headline.paxMinLostPerDay + r.headline.paxMinAdditionsPerDay, 9);
    const sum = summaryObject(r) as { headline: Record<string, number> };
    expect(sum.headline.pax_min_at_stake_per_day).toBeCloseTo(
      sum.headline.pax_min_lost_per_day + sum.headline.pax_min_additions_per_day,
      0,
    );
    expect(indexHtml(r)).toContain('Passenger-minutes at stake per day');
  });
});

describe('a timing point mid-gap', () => {
  // route C: stops every 250 m, and t11 halfway between t10 and t12, 600 m apart, passed without service:
  // the riders' gap is t10 to t12. Route D, on a cross street, serves t11 as an ordinary stop 100 m from
  // its neighbours.
  const cd = along(30, { 10: 300, 11: 300 });
  const dd = along(30, { 18: 150, 19: 100, 20: 100 });
  const stops = [
    ...cd.map((d, k) => stopAt(`t${k}`, d)),
    ...ids('d', 30)
      .filter((id) => id !== 'd20')
      .map((id) => stopAt(id, cd[11], dd[20] - dd[Number(id.slice(1))])),
  ];
  const dIds = ids('d', 30).map((id) => (id === 'd20' ? 't11' : id));
  const { feed, patterns } = network(stops, [
    { id: 'C:0:1', route: 'C', stops: ids('t', 30), distM: cd, timingOnly: [11] },
    { id: 'D:0:1', route: 'D', stops: dIds, distM: dd },
  ]);
  const r = runAudit(feed, patterns, { generatedAt: GEN });
  const c = rows(stopsCsv(r))
    .filter((s) => s.pattern_id === 'C:0:1')
    .slice(9, 14); // t9 to t13

  it('leaves it out of the gaps in stops.csv, with its own stop verdict and no gap verdicts', () => {
    expect(c.map((s) => s.stop_id)).toEqual(['t9', 't10', 't11', 't12', 't13']);
    expect(c.map((s) => s.gap_after_m)).toEqual(['250', '600', '', '250', '250']);
    expect(c.map((s) => s.gap_before_m)).toEqual(['250', '250', '', '600', '250']);
    expect(c[2].stop_verdict).toBe('timing-only');
    expect([c[2].gap_before_verdict, c[2].gap_after_verdict]).toEqual(['', '']);
    expect(c[1].gap_after_verdict).toBe('wide');
    expect(c[3].gap_before_verdict).toBe('wide');
    const p = r.patterns.find((x) => x.patternId === 'C:0:1')!;
    expect(p.bandHighM).toBeLessThan(600);
    expect(p.wideGaps).toBe(1);
    // 28 riders' gaps: 27 of 250 m and one of 600 m, so 27 x 250 + 600 over 28 [D]
    expect(p.medianGapM).toBeCloseTo(250, 6);
    expect(p.meanGapM).toBeCloseTo((27 * 250 + 600) / 28, 6);
  });

  it("leaves it out of the page's stop list, so the page's gaps are stops.csv's", () => {
    const data = pageData(r, 'metric', 400) as {
      stopTable: [string, ...unknown[]][];
      patterns: { id: string; stops: number[][]; gaps: number[][] }[];
    };
    const p = data.patterns.find((x) => x.id === 'C:0:1')!;
    // a pattern's stop rows name their stop by its place in the page's one stop table: [ref, dist, ...]
    expect(p.stops.map((s) => data.stopTable[s[0]][0])).toEqual(ids('t', 30).filter((id) => id !== 't11'));
    // the wide gap names its first stop by its place in the list; the next stop there is 600 m on
    expect(p.gaps.map((g) => [g[0], g[1]])).toEqual([[10, 600]]);
    const dist = p.stops.map((s) => s[1]);
    expect(dist[11] - dist[10]).toBe(600);
    // stop_points.geojson: t11 is served by route D only
    const t11 = stopPointsGeoJson(r).features.find((f) => f.properties!.stop_id === 't11')!;
    expect(t11.properties!.route_ids).toBe('D');
  });

  it("does not fix route D's stop because route C passes it without service", () => {
    const d = rows(stopsCsv(r)).find((s) => s.pattern_id === 'D:0:1' && s.stop_id === 't11')!;
    expect(d.stop_verdict).toBe('close');
    expect(r.candidates.some((x) => x.action === 'remove' && x.stopId === 't11')).toBe(true);
  });
});

describe('stop verdicts and gap verdicts apart', () => {
  // route E: u11 has a 900 m gap before it and a 100 m gap after: the old verdict column calls the stop
  // "wide" (a gap's label); its own verdict is ok, and the gaps say wide and short
  const d = along(30, { 10: 900, 11: 100 });
  const stops = d.map((x, k) => stopAt(`u${k}`, x));
  const { feed, patterns } = network(stops, [{ id: 'E:0:1', route: 'E', stops: stops.map((s) => s.id), distM: d }]);
  const r = runAudit(feed, patterns, { generatedAt: GEN });
  const e = rows(stopsCsv(r));

  it('gives u11 the stop verdict ok and the gap verdicts wide (before) and short (after)', () => {
    const p = r.patterns[0];
    expect(100).toBeLessThan(p.bandLowM); // the hand-made gaps sit where the test says: 100 m below the band,
    expect(900).toBeGreaterThan(p.bandHighM); // 900 m above it, 250 m within it
    expect(250).toBeGreaterThan(p.bandLowM);
    expect(250).toBeLessThan(p.bandHighM);
    expect(e[11].verdict).toBe('wide');
    expect(e[11].stop_verdict).toBe('ok');
    expect([e[11].gap_before_verdict, e[11].gap_after_verdict]).toEqual(['wide', 'short']);
    // each row's gap_after_verdict is the next row's gap_before_verdict: one verdict per gap
    for (let k = 0; k + 1 < e.length; k++) expect(e[k].gap_after_verdict).toBe(e[k + 1].gap_before_verdict);
    expect(e[0].gap_before_verdict).toBe('');
    expect(e.at(-1)!.gap_after_verdict).toBe('');
    // terminals: a fixed stop whatever its gaps
    expect(e[0].stop_verdict).toBe('fixed');
    expect(e[10].gap_after_verdict).toBe('wide');
    expect(e[5].gap_after_verdict).toBe('ok');
  });
});
