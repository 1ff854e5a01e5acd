// The built CLI's whatif command on the demo feed (the invented city of Vellmoor): stops by id and by name,
// the errors that refuse a scenario whole (ambiguous name, unknown stop, terminal, far coordinates,
// unknown keys), the terminal table, --json, parameter options, --out with its page and scenario.json.
// The walk added by one removal is checked against a*b/(a+b) with the neighbours' spacing measured
// independently by geographiclib.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT, runCli } from '../helpers/cli.js';
import { REPORT_MARKER } from '../../src/report/writeFolder.js';
import { readFeed } from '../../src/gtfs/readFeed.js';
import geodesicPkg from 'geographiclib-geodesic';
import { CAUTIONS } from '../../src/audit/cautions.js';

const Geodesic = (geodesicPkg as any).Geodesic;
const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');
const FIX = join(ROOT, 'fixtures/whatif');
let dir: string;

const cli = (args: string[]) => runCli(['whatif', ...args]);

let demoStops: Map<string, { lat: number; lon: number }>;
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'stopspan-whatif-cli-'));
  const feed = await readFeed(DEMO, { date: 'all' });
  demoStops = new Map(feed.stops.map((s) => [s.id, { lat: s.lat, lon: s.lon }]));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A demo stop's coordinates, as the feed's stops.txt gives them. */
function demoStop(id: string): { lat: number; lon: number } {
  const s = demoStops.get(id);
  if (!s) throw new Error(`no demo stop ${id}`);
  return s;
}

describe('stopspan whatif on the demo feed', () => {
  it('removes a stop by id and prints the table per pattern and in total, the sensitivity and the cautions', async () => {
    const r = await cli([DEMO, '--remove', 'MKT-05-a']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^ +R1:0:1 +R1:0:2 +total$/m);
    for (const row of [
      'riders whose stop changes /day',
      'walk added, real minutes/day',
      'walk added, pax-min/day (x2.0 walk weight)',
      'walk saved, pax-min/day',
      'ride time saved, pax-min/day',
      "neighbours' extra stopping",
      'net, pax-min/day',
      'run time saved per trip, s',
      'vehicle-hours saved per day',
      'widest gap a change makes, m (policy 800)',
      'within 400 m of a stop, before -> after',
    ]) {
      expect(r.stdout).toContain(row);
    }
    expect(r.stdout).toMatch(
      /^R1:0:1: route 1 to Eastgate Terminus\n  removes MKT-05-a Market St \/ Gorse Hill Rd: gaps \d+ \+ \d+ m become \d+ m, within the 800 m policy$/m,
    );
    expect(r.stdout).toMatch(
      /^walking: each of about [\d,]+ riders a day whose stop changes walks about \d+ m, \d+ s, further on average; [\d,]+ real minutes a day in all, counted as [\d,]+ passenger-minutes at walk weight 2\.0$/m,
    );
    expect(r.stdout).toMatch(/sensitivity \(net pax-min\/day\): walk_weight=1\.5 [\d,-]+, walk_weight=2\.5 [\d,-]+/);
    expect(r.stdout).toMatch(/demand assumed, not counted/);
    expect(r.stdout.replace(/\s+/g, ' ')).toContain(CAUTIONS.join(' '));
  });

  it('removes a stop by its unique name', async () => {
    const r = await cli([DEMO, '--remove', 'Ring Rd / Glebe Rd', '--json']);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(doc.patterns.map((p: any) => p.removed_stop_ids)).toEqual([['RNG-07-a']]);
  });

  it('refuses an ambiguous name, an unknown stop, a terminal and a far point, naming the item, and prints nothing on stdout', async () => {
    const cases: [string[], RegExp][] = [
      [
        ['--remove', 'Market St / Yarrow Rd'],
        /remove\[0\]: stop name "Market St \/ Yarrow Rd" is ambiguous \(2 stops\); give the stop_id[^\n]*\n  MKT-02-a  Market St \/ Yarrow Rd: route 1 direction 0 to [^\n]+\n  MKT-02-b  Market St \/ Yarrow Rd: route 1 direction 1 to Westgate Terminus\n/,
      ],
      [['--remove', 'MKT-05-a,VELL-NOWHERE'], /remove\[1\]: unknown stop "VELL-NOWHERE"/],
      [['--remove', 'MKT-01-a'], /remove\[0\]: stop MKT-01-a is a terminal of pattern R1:0:\d and cannot be removed/],
      [['--add', '45.1,10.0:R1'], /add\[0\]: 45\.1,10 is \d+ m from the nearest pattern of route R1 \(limit 200 m/],
      [['--move', 'MKT-09-a:45.03,10.0135'], /move\[0\]: 45\.03,10\.0135 is \d+ m from pattern R1:0:\d \(limit 200 m\)/],
      [['--add', 'north of the market'], /invalid option --add: expected LAT,LON\[:ROUTE_ID\]/],
      [[], /nothing to weigh: give --remove, --add, --move or --scenario/],
    ];
    for (const [args, message] of cases) {
      const r = await cli([DEMO, ...args]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr).toMatch(/^error: /);
      expect(r.stderr).toMatch(message);
      expect(r.stdout).toBe('');
    }
  });

  it('refuses a scenario file with an unknown key before reading the feed', async () => {
    // the feed argument does not exist: the scenario error comes first, so nothing was computed from it
    const r = await cli([join(dir, 'no-such-feed.zip'), '--scenario', join(FIX, 'unknown-key.json')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/unknown-key\.json: invalid scenario key close: expected one of remove, add, move/);
    expect(r.stdout).toBe('');
  });

  it('--json prints one document with the totals, per-pattern figures, sensitivity and cautions', async () => {
    const r = await cli([DEMO, '--scenario', join(FIX, 'market-street.json'), '--json']);
    expect(r.code).toBe(0);
    expect(r.stdout.trim().split('\n').length).toBe(1);
    const doc = JSON.parse(r.stdout);
    expect(doc.tool.name).toBe('stopspan');
    expect(doc.scenario.remove).toEqual(['MKT-05-a', { stop: 'Ring Rd / Glebe Rd', routes: ['R30'] }]);
    const t = doc.totals;
    for (const k of [
      'patterns_affected',
      'riders_affected_per_day',
      'walk_added_pax_min_per_day',
      'walk_saved_pax_min_per_day',
      'ride_saved_pax_min_per_day',
      'neighbours_extra_pax_min_per_day',
      'net_pax_min_per_day',
      'run_time_saved_per_trip_s',
      'vehicle_hours_per_day',
      'largest_gap_before_m',
      'largest_gap_after_m',
      'over_policy_after',
    ]) {
      expect(typeof t[k], k).toBe('number');
    }
    expect(t.patterns_affected).toBe(doc.patterns.length);
    const sum = (k: string) => doc.patterns.reduce((s: number, p: any) => s + p[k], 0);
    expect(t.net_pax_min_per_day).toBeCloseTo(sum('net_pax_min_per_day'), 6);
    expect(t.walk_added_pax_min_per_day).toBeCloseTo(sum('walk_added_pax_min_per_day'), 6);
    // R30 lost only its named stop; route R1 patterns got the move and the addition
    expect(doc.patterns.find((p: any) => p.route_id === 'R30').removed_stop_ids).toEqual(['RNG-07-a']);
    expect(doc.patterns.filter((p: any) => p.route_id === 'R1' && p.added_count === 1).length).toBeGreaterThan(0);
    expect(doc.patterns.some((p: any) => p.moved_stop_ids.includes('MKT-09-a'))).toBe(true);
    expect(doc.sensitivity.map((s: any) => s.label)).toEqual(['walk_weight=1.5', 'walk_weight=2.5']);
    expect(doc.cautions).toEqual([...CAUTIONS]);
  });

  it('one removal adds a*b/(a+b) of walk per trip end, with a and b measured by geographiclib', async () => {
    const r = await cli([DEMO, '--remove', 'MKT-05-a', '--json']);
    const doc = JSON.parse(r.stdout);
    const e = doc.patterns.find((p: any) => p.pattern_id === 'R1:0:1');
    // [C] geographiclib (Karney 2013, WGS84 geodesics): the neighbours' distances along the straight street
    const [s4, s5, s6] = ['MKT-04-a', 'MKT-05-a', 'MKT-06-a'].map(demoStop);
    const a = Geodesic.WGS84.Inverse(s4.lat, s4.lon, s5.lat, s5.lon).s12;
    const b = Geodesic.WGS84.Inverse(s5.lat, s5.lon, s6.lat, s6.lon).s12;
    const w = doc.params.walk_weight.value;
    const v = doc.params.walk_speed_mps.value;
    // [D] design notes section 4: walk added = w/v * riders * a*b/(a+b); riders = the stop's trip ends
    const expected = ((w / v) * e.riders_affected_per_day * ((a * b) / (a + b))) / 60;
    expect(Math.abs(e.walk_added_pax_min_per_day - expected) / expected).toBeLessThan(0.01);
    expect(e.largest_gap_after_m).toBeGreaterThanOrEqual(a + b - 5);
  });

  it('takes parameter options and files: a heavier walk weight raises the net, ridership changes the demand source', async () => {
    const base = JSON.parse((await cli([DEMO, '--remove', 'MKT-05-a', '--json'])).stdout);
    const heavy = JSON.parse((await cli([DEMO, '--remove', 'MKT-05-a', '--json', '--walk-weight', '3'])).stdout);
    expect(heavy.params.walk_weight).toMatchObject({ value: 3, source: 'user' });
    expect(heavy.totals.net_pax_min_per_day).toBeGreaterThan(base.totals.net_pax_min_per_day);
    expect(heavy.totals.ride_saved_pax_min_per_day).toBeCloseTo(base.totals.ride_saved_pax_min_per_day, 6);
    const counted = JSON.parse(
      (await cli([DEMO, '--remove', 'MKT-05-a', '--json', '--ridership', join(ROOT, 'fixtures/demo/ridership.csv')])).stdout,
    );
    expect(counted.patterns.every((p: any) => p.demand_source === 'observed')).toBe(true);
    const bad = await cli([DEMO, '--remove', 'MKT-05-a', '--walk-weight', 'brisk']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/walk_weight/);
  });

  it('--out writes the page and scenario.json, refuses an existing folder without --force', async () => {
    const out = join(dir, 'market');
    const r = await cli([DEMO, '--scenario', join(FIX, 'market-street.json'), '--out', out, '--quiet']);
    expect(r.code).toBe(0);
    expect(readdirSync(out).sort()).toEqual([REPORT_MARKER, 'index.html', 'result.json', 'scenario.json']);
    const html = readFileSync(join(out, 'index.html'), 'utf8');
    expect(html).toMatch(/^<!doctype html>/);
    expect(html).toContain('Market St / Gorse Hill Rd (MKT-05-a): removed');
    expect(html).toContain('Market St / Quarry Hill Rd west: added');
    expect((html.match(/<svg class="chart strip wf-strip"/g) ?? []).length).toBe(
      JSON.parse(readFileSync(join(out, 'result.json'), 'utf8')).patterns.length,
    );
    expect(html).not.toMatch(/<script|https?:\/\//);
    const again = await cli([DEMO, '--remove', 'MKT-05-a', '--out', out]);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/already exists; choose another folder or pass --force/);
    expect(readFileSync(join(out, 'index.html'), 'utf8')).toBe(html);
    const forced = await cli([DEMO, '--remove', 'MKT-05-a', '--out', out, '--force', '--json']);
    expect(forced.code).toBe(0);
    expect(JSON.parse(readFileSync(join(out, 'result.json'), 'utf8'))).toEqual(JSON.parse(forced.stdout));
    expect(JSON.parse(readFileSync(join(out, 'scenario.json'), 'utf8'))).toEqual({ remove: ['MKT-05-a'] });
    expect(readdirSync(dir).filter((n) => n.startsWith('.'))).toEqual([]);
    expect(existsSync(join(out, 'index.html'))).toBe(true);
  });

  it('--units imperial writes the page in feet and refuses an unknown system', async () => {
    const out = join(dir, 'market-imperial');
    const r = await cli([DEMO, '--scenario', join(FIX, 'market-street.json'), '--out', out, '--units', 'imperial', '--quiet']);
    expect(r.code).toBe(0);
    const html = readFileSync(join(out, 'index.html'), 'utf8');
    // the walking policy of 800 m is 2,625 ft (1 ft = 0.3048 m exactly, NIST SP 811)
    expect(html).toContain('Largest gap before → after (policy 2,625 ft)');
    expect(html).toMatch(/\d ft → [\d,]+ ft/);
    expect(html).not.toMatch(/\d m → /);
    const bad = await cli([DEMO, '--remove', 'MKT-05-a', '--units', 'furlongs']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toBe('error: invalid option units: expected "metric" or "imperial", got "furlongs"\n');
  });
});

describe('stopspan whatif: stops as people name them, and answers people can quote', () => {
  it('finds a shared name by route and direction, by headsign, or on both sides of the street', async () => {
    const one = JSON.parse(
      (await cli([DEMO, '--remove', 'Market St / Glebe Rd', '--route', '1', '--direction', '0', '--json', '-q'])).stdout,
    );
    expect([...new Set(one.patterns.flatMap((p: any) => p.removed_stop_ids))]).toEqual(['MKT-09-a']);
    const byHeadsign = JSON.parse(
      (await cli([DEMO, '--remove', 'market st /  glebe rd', '--headsign', 'Westgate Terminus', '--json', '-q'])).stdout,
    );
    expect([...new Set(byHeadsign.patterns.flatMap((p: any) => p.removed_stop_ids))]).toEqual(['MKT-09-b']);
    const both = JSON.parse((await cli([DEMO, '--remove', 'Market St / Glebe Rd', '--both-directions', '--json', '-q'])).stdout);
    expect([...new Set(both.patterns.flatMap((p: any) => p.removed_stop_ids))].sort()).toEqual(['MKT-09-a', 'MKT-09-b']);
    // both sides together cost the sum of each side alone here: the two directions are separate patterns
    const other = JSON.parse((await cli([DEMO, '--remove', 'MKT-09-b', '--json', '-q'])).stdout);
    expect(both.totals.net_pax_min_per_day).toBeCloseTo(one.totals.net_pax_min_per_day + other.totals.net_pax_min_per_day, 6);
  });

  it('a misspelt name answers with the nearest spellings; a filter that leaves nothing lists the stops of that name', async () => {
    const r = await cli([DEMO, '--remove', 'Markt St / Glebe Rd']);
    expect(r.code).toBe(2);
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines[0]).toMatch(/^error: remove\[0\]: unknown stop "Markt St \/ Glebe Rd" .*nearest names/);
    expect(lines[1]).toBe('  Market St / Glebe Rd');
    const none = await cli([DEMO, '--remove', 'Market St / Glebe Rd', '--route', 'R30']);
    expect(none.code).toBe(2);
    expect(none.stderr).toMatch(/no stop named "Market St \/ Glebe Rd" is served by route R30/);
    expect(none.stderr).toMatch(/^  MKT-09-b  Market St \/ Glebe Rd: route 1 direction 1 to Westgate Terminus$/m);
  });

  it('--json on a failure prints the error document, with the matching stops', async () => {
    const r = await cli([DEMO, '--remove', 'Market St / Glebe Rd', '--json']);
    expect(r.code).toBe(2);
    const doc = JSON.parse(r.stdout);
    expect(doc.error.code).toBe('bad-scenario');
    expect(doc.error.choices.map((c: string) => c.split(' ')[0])).toEqual(['MKT-09-a', 'MKT-09-b']);
  });

  it('walk is given in real minutes and in weighted passenger-minutes, and per rider; every key is snake_case', async () => {
    const doc = JSON.parse((await cli([DEMO, '--remove', 'MKT-05-a', '--json', '-q'])).stdout);
    const t = doc.totals;
    expect(t.walk_added_pax_min_per_day).toBeCloseTo(t.walk_added_min_per_day * doc.walk_weight, 6);
    // per rider: real minutes * 60 s = riders * seconds each; seconds each = metres each / walking speed
    expect(t.walk_added_per_rider_s * t.riders_affected_per_day).toBeCloseTo(t.walk_added_min_per_day * 60, 6);
    expect(t.walk_added_per_rider_m).toBeCloseTo(t.walk_added_per_rider_s * doc.walk_speed_mps, 6);
    const keys: string[] = [];
    const walk = (v: unknown): void => {
      if (Array.isArray(v)) v.forEach(walk);
      else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) (keys.push(k), walk(x));
    };
    walk(doc);
    expect(keys.filter((k) => /[A-Z]/.test(k))).toEqual([]);
    const change = doc.patterns[0].changes[0];
    expect(change).toMatchObject({ action: 'remove', stop_id: 'MKT-05-a', stop_name: 'Market St / Gorse Hill Rd', over_policy: false });
    expect(change.gaps_after_m[0]).toBeCloseTo(change.gaps_before_m[0] + change.gaps_before_m[1], 6);
  });

  it('a removal that opens a gap above the walking policy is marked on its line', async () => {
    const r = await cli([DEMO, '--remove', 'MKT-05-a,MKT-06-a', '-q']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^  removes MKT-06-a [^\n]*: gaps \d+ \+ \d+ m become [\d,]+ m, above the 800 m policy !$/m);
  });

  it('scenario.json written by --out is a scenario: read back, it gives the same figures', async () => {
    const out = join(dir, 'roundtrip');
    const first = await cli([
      DEMO,
      '--remove',
      'Market St / Glebe Rd',
      '--route',
      '1',
      '--direction',
      '0',
      '--add',
      '45.019919,10.0008:R1',
      '--out',
      out,
      '--json',
      '-q',
    ]);
    expect(first.code).toBe(0);
    const again = await cli([DEMO, '--scenario', join(out, 'scenario.json'), '--json', '-q']);
    expect(again.code).toBe(0);
    expect(JSON.parse(again.stdout).totals).toEqual(JSON.parse(first.stdout).totals);
  });

  it("fleet and frequency per route: round trip saved, peak vehicles, the same fleet's headway, waiting, operating cost", async () => {
    const doc = JSON.parse((await cli([DEMO, '--remove', 'MKT-05-a', '--json', '-q', '--params', join(FIX, 'cost.json')])).stdout);
    const f = doc.fleet.find((x: any) => x.route_id === 'R1');
    expect(f.run_time_saved_per_round_trip_s).toBeGreaterThan(0);
    expect(f.headway_same_fleet_s).toBeCloseTo(
      (f.peak_headway_s * (f.round_trip_s - f.run_time_saved_per_round_trip_s)) / f.round_trip_s,
      6,
    );
    expect(f.peak_vehicles_before).toBe(Math.ceil(f.round_trip_s / f.peak_headway_s - 1e-9));
    expect(f.operating_cost_saved_per_day).toBeCloseTo(f.vehicle_hours_per_day * 90, 6);
    const text = (await cli([DEMO, '--remove', 'MKT-05-a', '-q'])).stdout;
    expect(text).toMatch(
      /^fleet, route 1: \d+ s saved per round trip of [\d.]+ min; at the peak headway of [\d.]+ min that frees \d+ of \d+ peak vehicles \([\d.]+ of a vehicle\), or the same fleet runs every [\d.]+ min, saving riders about [\d,]+ minutes of waiting a day \(half the headway change per boarding, common planning practice\)$/m,
    );
  });
});
