// compareFeeds on hand-built Vellmoor feeds: stop and pattern changes, spacing before and after.
import { describe, expect, it } from 'vitest';
import { auditBrief, comparedPart, compareFeeds, lcsMatch } from '../../src/compare/compare.js';
import { medianGapM } from '../../src/network/patternFigures.js';
import { buildFeed, cleanSpec, street, type FeedSpec } from '../helpers/buildFeed.js';
import type { AuditResult, Candidate } from '../../src/audit/types.js';

function twoRoutes(): FeedSpec {
  const spec = cleanSpec();
  const b = street(4, 300, 'B');
  spec.stops.push(...b);
  spec.routes = [{ id: 'R1' }, { id: 'R2' }];
  spec.trips.push({ id: 'T2', routeId: 'R2', times: b.map((s, k) => [s.id, 30000 + 60 * k, 30000 + 60 * k] as [string, number, number]) });
  return spec;
}

describe('compareFeeds', () => {
  it('reports nothing between a feed and itself', () => {
    const a = buildFeed(twoRoutes());
    const c = compareFeeds(a.feed, a.feed, a.patterns, a.patterns);
    expect(c.stops).toEqual({ added: [], removed: [], moved: [], renamed: [] });
    expect(c.patterns).toMatchObject({ added: [], removed: [], changed: [], unchanged: 2 });
    expect(c.spacing.before).toEqual(c.spacing.after);
    expect(c.candidates).toBeNull();
  });

  it('finds a removed, an added, a moved and a renamed stop, and the patterns they change', () => {
    const a = buildFeed(twoRoutes());
    const spec = twoRoutes();
    spec.stops = spec.stops.filter((s) => s.id !== 'S3');
    spec.trips[0].times = spec.trips[0].times.filter((t) => t[0] !== 'S3');
    spec.stops.push({
      id: 'B5',
      lat: spec.stops[spec.stops.length - 1].lat,
      lon: spec.stops[spec.stops.length - 1].lon + 0.004,
      name: 'Vellmoor Haven',
    });
    spec.trips[1].times.push(['B5', 30300, 30300]);
    const b1 = spec.stops.find((s) => s.id === 'B1')!;
    b1.lat += 30 / 111_250; // 30 m north
    spec.stops.find((s) => s.id === 'S1')!.name = 'Vellmoor Station Square';
    const b = buildFeed(spec);
    const c = compareFeeds(a.feed, b.feed, a.patterns, b.patterns);
    expect(c.stops.removed.map((s) => s.stopId)).toEqual(['S3']);
    expect(c.stops.added.map((s) => s.stopId)).toEqual(['B5']);
    expect(c.stops.moved.map((s) => s.stopId)).toEqual(['B1']);
    expect(c.stops.moved[0].movedM).toBeCloseTo(30, 0);
    expect(c.stops.renamed).toEqual([{ stopId: 'S1', oldName: 'Vellmoor S1', newName: 'Vellmoor Station Square' }]);
    expect(c.patterns.changed.map((p) => [p.routeId, p.dropped, p.inserted, p.merged])).toEqual([
      ['R1', ['S3'], [], false],
      ['R2', [], ['B5'], false],
    ]);
    expect(c.patterns.added).toEqual([]);
    expect(c.patterns.removed).toEqual([]);
    // R1's 400 m gaps become 400, 800, 400; R2 gains a far gap [D]
    expect(c.spacing.before.stopsServed).toBe(9);
    expect(c.spacing.after.stopsServed).toBe(9);
    // a 30 m move is not a move with a 50 m threshold
    expect(compareFeeds(a.feed, b.feed, a.patterns, b.patterns, { moveThresholdM: 50 }).stops.moved).toEqual([]);
  });

  it('tells a new route from a changed one', () => {
    const a = buildFeed(cleanSpec());
    const b = buildFeed(twoRoutes());
    const c = compareFeeds(a.feed, b.feed, a.patterns, b.patterns);
    expect(c.patterns.added.map((p) => p.routeId)).toEqual(['R2']);
    expect(c.patterns.changed).toEqual([]);
    const back = compareFeeds(b.feed, a.feed, b.patterns, a.patterns);
    expect(back.patterns.removed.map((p) => [p.routeId, p.stopCount, p.firstStopId, p.lastStopId])).toEqual([['R2', 4, 'B1', 'B4']]);
  });

  it('reports a pattern that now equals an existing one as merged', () => {
    const spec = cleanSpec();
    spec.trips.push({ id: 'T2', times: spec.trips[0].times.filter((t) => t[0] !== 'S3'), shapeId: 'SH1' });
    const a = buildFeed(spec); // R1 has [S1..S5] and [S1,S2,S4,S5]
    const spec2 = cleanSpec();
    spec2.trips[0].times = spec2.trips[0].times.filter((t) => t[0] !== 'S3');
    const b = buildFeed(spec2); // only [S1,S2,S4,S5]
    const c = compareFeeds(a.feed, b.feed, a.patterns, b.patterns);
    expect(c.patterns.unchanged).toBe(1);
    expect(c.patterns.changed).toMatchObject([{ dropped: ['S3'], inserted: [], merged: true }]);
    expect(c.patterns.removed).toEqual([]);
  });

  it('counts trips a day with frequencies expanded, and sees a retimed trip that leaves the count unchanged', () => {
    const a = buildFeed(twoRoutes());
    const withFreq = (headwayS: number) => {
      const runs = Math.ceil(3600 / headwayS); // GTFS Schedule reference: runs start at start_time + k * headway_secs before end_time [C]
      const feed = { ...a.feed, frequencies: [{ tripId: 'T1', startS: 7 * 3600, endS: 8 * 3600, headwayS, exactTimes: 1 as const }] };
      const patterns = {
        ...a.patterns,
        patterns: a.patterns.patterns.map((p) => (p.tripIds.includes('T1') ? { ...p, tripsPerDay: runs } : p)),
      };
      return { feed, patterns };
    };
    const before = withFreq(600); // 6 runs, 07:00 to 07:50 [D]
    const after = withFreq(1200); // 3 runs, 07:00 to 07:40 [D]
    const c = compareFeeds(before.feed, after.feed, before.patterns, after.patterns);
    expect(c.trips.byRoute).toEqual([{ routeId: 'R1', shortName: expect.any(String), tripsBefore: 6, tripsAfter: 3, changePct: -50 }]);
    expect(c.trips.byPattern).toHaveLength(1);
    expect(c.trips.byPattern[0]).toMatchObject({
      tripsBefore: 6,
      tripsAfter: 3,
      tripIdsAddedCount: 0,
      tripIdsRemovedCount: 0,
      firstDeparture: { before: '7:00:00', after: '7:00:00' },
      lastDeparture: { before: '7:50:00', after: '7:40:00' },
    });
    expect(c.patterns.unchanged).toBe(1); // R2's pattern only

    // the same trip leaving ten minutes later: same count, different departures
    const spec = twoRoutes();
    spec.trips[1].times = spec.trips[1].times.map(([id, arr, dep]) => [id, arr + 600, dep + 600] as [string, number, number]);
    const later = buildFeed(spec);
    const r = compareFeeds(a.feed, later.feed, a.patterns, later.patterns);
    expect(r.trips.byRoute).toEqual([]);
    expect(r.trips.byPattern.map((x) => [x.routeId, x.tripsBefore, x.tripsAfter, x.firstDeparture.before, x.firstDeparture.after])).toEqual(
      [['R2', 1, 1, '8:20:00', '8:30:00']],
    );
    expect(r.patterns.unchanged).toBe(1);
  });

  it('lcsMatch matches the longest common subsequence', () => {
    // the classic textbook pair ABCBDAB / BDCABA has an LCS of length 4 (Cormen et al., Introduction to Algorithms, section 15.4) [C]
    expect(lcsMatch([...'ABCBDAB'], [...'BDCABA']).length).toBe(4);
  });

  it('medianGapM skips non-passenger stops', () => {
    const { patterns } = buildFeed(cleanSpec());
    expect(medianGapM(patterns)).toBeCloseTo(400, 1);
    patterns.patterns[0].passengerStop[1] = false;
    // gaps 800, 400, 400 [D]
    expect(medianGapM(patterns)).toBeCloseTo(400, 1);
    patterns.patterns[0].passengerStop[3] = false;
    expect(medianGapM(patterns)).toBeCloseTo(800, 1); // 800, 800
  });

  it('takes close stops, wide gaps, passenger-minutes and candidates from the two audits', () => {
    const a = buildFeed(cleanSpec());
    const cand = (action: 'remove' | 'add', stopId: string, stopName: string, net: number) =>
      ({
        rank: 1,
        action,
        stopId,
        stopName,
        lat: 0,
        lon: 0,
        routeIds: ['R1'],
        patternIds: [],
        netPaxMinPerDay: net,
      }) as unknown as Candidate;
    const audit = (closeStops: number, wideGaps: number, paxMinLostPerDay: number, candidates: Candidate[]) =>
      ({ headline: { closeStops, wideGaps, paxMinLostPerDay }, candidates }) as unknown as AuditResult;
    const c = compareFeeds(a.feed, a.feed, a.patterns, a.patterns, {
      audits: {
        old: audit(4, 1, 120, [cand('remove', 'S2', 'Vellmoor S2', -30), cand('add', '', 'between S3 and S4', -5)]),
        new: audit(3, 1, 90, [cand('remove', 'S4', 'Vellmoor S4', -12), cand('add', '', 'between S3 and S4', -6)]),
      },
    });
    expect(c.spacing.before).toMatchObject({ closeStops: 4, wideGaps: 1, paxMinLostPerDay: 120 });
    expect(c.spacing.after).toMatchObject({ closeStops: 3, wideGaps: 1, paxMinLostPerDay: 90 });
    expect(c.candidates!.appeared.map((x) => x.stopId)).toEqual(['S4']);
    expect(c.candidates!.disappeared.map((x) => x.stopId)).toEqual(['S2']);
  });

  it('compares as the whole audits do from their brief, which holds the headline, candidates and land-use figures alone', () => {
    const a = buildFeed(cleanSpec());
    const cand = {
      rank: 1,
      action: 'remove',
      stopId: 'S2',
      stopName: 'Vellmoor S2',
      routeIds: ['R1'],
      netPaxMinPerDay: -30,
    } as unknown as Candidate;
    const whole = (closeStops: number, candidates: Candidate[]) =>
      ({
        headline: { closeStops, wideGaps: 1, paxMinLostPerDay: 60 },
        candidates,
        stops: [{}],
        gaps: [{}],
        patterns: [{}],
        sensitivity: [{}],
      }) as unknown as AuditResult;
    const audits = { old: whole(4, [cand]), new: whole(2, []) };
    const brief = auditBrief(audits.old);
    expect(Object.keys(brief).sort()).toEqual(['candidates', 'headline', 'landUse']);
    const full = compareFeeds(a.feed, a.feed, a.patterns, a.patterns, { audits });
    expect(compareFeeds(a.feed, a.feed, a.patterns, a.patterns, { audits: { old: brief, new: auditBrief(audits.new) } })).toEqual(full);
    expect(full.candidates!.disappeared.map((x) => x.stopId)).toEqual(['S2']);
  });

  it('rejects a negative move threshold', () => {
    const a = buildFeed(cleanSpec());
    expect(() => compareFeeds(a.feed, a.feed, a.patterns, a.patterns, { moveThresholdM: -5 })).toThrow(/moveThresholdM/);
  });
});

describe('comparedPart', () => {
  it('compares as the whole older feed does, holding one first row per departure time and no trips or shapes', () => {
    const a = buildFeed(twoRoutes());
    const spec = twoRoutes();
    // R1 gains a trip later in the day, R2's trip leaves a minute later, with its stops the same
    spec.trips.push({
      ...spec.trips[0],
      id: 'T1b',
      times: spec.trips[0].times.map(([s, arr, dep]) => [s, arr + 3600, dep + 3600] as [string, number, number]),
    });
    spec.trips[1].times = spec.trips[1].times.map(([s, arr, dep]) => [s, arr + 60, dep + 60] as [string, number, number]);
    const b = buildFeed(spec);
    const whole = compareFeeds(a.feed, b.feed, a.patterns, b.patterns);
    const part = comparedPart(a.feed, a.patterns);
    expect(compareFeeds(part, b.feed, a.patterns, b.patterns)).toEqual(whole);
    expect(whole.trips.byPattern.length).toBeGreaterThan(0); // the check above compares trip changes
    expect(part.trips.size).toBe(0);
    expect(part.shapes.size).toBe(0);
    expect([...part.stopTimes.values()].every((st) => st.depS.length === 1)).toBe(true);
    expect(part.stopTimes.size).toBe(a.patterns.patterns.reduce((n, p) => n + p.tripIds.length, 0));
  });
});
