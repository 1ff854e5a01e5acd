// buildPatterns on hand-built Vellmoor feeds: grouping, stable ids, trips per day with frequencies,
// the order of preference for distances, non-passenger stops, run times and interpolated times.

import { describe, it, expect } from 'vitest';
import { buildPatterns, MAX_PATTERN_STOPS, MAX_PATTERNS } from '../../src/network/buildPatterns.js';
import { WarningSink } from '../../src/common/warnings.js';
import { StopspanError } from '../../src/common/errors.js';
import { haversineM } from '../../src/network/geodesy.js';
import { handFeed, line, type TripSpec } from '../helpers/handFeed.js';

// Five stops along an east-west street, 300 m apart, 6 m north of the shape.
const STOPS: Record<string, [number, number]> = { A: [0, 6], B: [300, 6], C: [600, 6], D: [900, 6], E: [1200, 6] };
const SHAPE = { xy: line(0, 0, 1200, 0) };
const run = (id: string, stops: string[], startS: number, extra: Partial<TripSpec> = {}): TripSpec => ({
  id,
  shape: 'SH1',
  times: stops.map((stop, i) => ({ stop, arr: startS + i * 60, dep: startS + i * 60 + (i > 0 && i < stops.length - 1 ? 10 : 0) })),
  ...extra,
});

describe('buildPatterns: grouping and ids', () => {
  const feed = handFeed({
    stops: STOPS,
    shapes: { SH1: SHAPE },
    trips: [
      run('t3', ['A', 'B', 'C', 'D', 'E'], 3600),
      run('t1', ['A', 'B', 'C', 'D', 'E'], 7200),
      run('t2', ['A', 'C', 'E'], 9000),
      run('t0', ['A', 'C', 'E'], 9600),
      run('t9', ['A', 'B', 'C'], 9900),
      run('r1', ['E', 'D', 'C', 'B', 'A'], 3600, { dir: 1, shape: '' }),
      run('x1', ['B', 'C', 'D'], 3600, { route: 'V2' }),
      run('sat', ['A', 'B', 'C', 'D', 'E'], 3600, { service: 'SA' }),
    ],
  });
  const set = buildPatterns(feed);

  it('groups trips by route, direction and the ordered stop list', () => {
    expect(set.patterns.map((p) => [p.id, p.tripIds.join(' ')])).toEqual([
      ['V1:0:1', 't0 t2'],
      ['V1:0:2', 't1 t3'],
      ['V1:0:3', 't9'],
      ['V1:1:1', 'r1'],
      ['V2:0:1', 'x1'],
    ]);
  });

  it('numbers patterns by trips per day and breaks ties by the first trip id', () => {
    // V1:0 has two patterns of 2 trips each: 't0 t2' sorts before 't1 t3'.
    expect(set.patterns.find((p) => p.id === 'V1:0:1')!.tripsPerDay).toBe(2);
    expect(set.patterns.find((p) => p.id === 'V1:0:3')!.tripsPerDay).toBe(1);
  });

  it('leaves out trips whose service does not run on the date', () => {
    expect(set.patterns.flatMap((p) => p.tripIds)).not.toContain('sat');
    expect(set.date).toBe('2026-10-14');
  });

  it('lists the routes at each stop', () => {
    const idx = (id: string) => feed.stopIndex.get(id)!;
    expect([...set.routesAtStop.get(idx('C'))!].sort()).toEqual(['V1', 'V2']);
    expect([...set.routesAtStop.get(idx('A'))!]).toEqual(['V1']);
  });

  it('projects onto the shape when the shape has no shape_dist_traveled', () => {
    const p = set.patterns.find((q) => q.id === 'V1:0:2')!;
    expect(p.distanceSource).toBe('shape_projection');
    expect(p.shapeId).toBe('SH1');
    expect(p.distAlongM.map((d) => Math.round(d))).toEqual([0, 300, 600, 900, 1200]);
    expect(p.offsetFromShapeM.map((d) => Math.round(d!))).toEqual([6, 6, 6, 6, 6]);
    expect(p.lengthM).toBe(p.distAlongM[4]);
    // A straight 121-point shape simplifies to its two ends.
    expect(p.path).toHaveLength(2);
  });

  it('uses great-circle distances between stops without a shape, and the stops as the path', () => {
    const p = set.patterns.find((q) => q.id === 'V1:1:1')!;
    expect(p.distanceSource).toBe('great_circle');
    expect(p.offsetFromShapeM.every((o) => o === null)).toBe(true);
    const s = p.stopIdx.map((i) => feed.stops[i]);
    expect(p.distAlongM[1]).toBeCloseTo(haversineM(s[0].lat, s[0].lon, s[1].lat, s[1].lon), 9);
    expect(p.path).toEqual(s.map((x) => [x.lon, x.lat]));
  });

  it('takes run times and dwell from the schedule', () => {
    const p = set.patterns.find((q) => q.id === 'V1:0:2')!;
    expect(p.gapRunTimeS).toEqual([60, 50, 50, 50]);
    expect(p.scheduledDwellS).toEqual([0, 10, 10, 10, 0]);
    expect(p.runTimeS).toBe(240);
    expect(p.gapTimeInterpolated).toEqual([false, false, false, false]);
  });
});

describe('buildPatterns: distances from shape_dist_traveled', () => {
  it('reads shape_dist_traveled in kilometres and converts it to metres', () => {
    const feed = handFeed({
      stops: STOPS,
      shapes: { SH1: { xy: SHAPE.xy, dist: SHAPE.xy.map(([x]) => x / 1000) } },
      trips: [
        {
          id: 'k1',
          shape: 'SH1',
          times: ['A', 'B', 'C', 'D', 'E'].map((stop, i) => ({ stop, arr: 3600 + i * 60, dist: [0, 0.31, 0.6, 0.9, 1.2][i] })),
        },
      ],
    });
    const set = buildPatterns(feed);
    const p = set.patterns[0];
    expect(p.distanceSource).toBe('shape_dist_traveled');
    expect(set.shapeDistUnit!.unit).toBe('km');
    // 0.31 km as given in the feed, not the 300 m the projection would give.
    expect(p.distAlongM[1]).toBeCloseTo(310, 9);
    expect(p.distAlongM[4]).toBeCloseTo(1200, 9);
  });

  it('reads each shape in the unit its own length fits when one shape is in kilometres and the rest in metres', () => {
    // GTFS Schedule reference [C]: shape_dist_traveled must use the same unit in shapes.txt and stop_times.txt
    // for a shape; it says nothing of one unit for the whole feed, so a mixed feed is read shape by shape.
    const warnings = new WarningSink();
    const feed = handFeed({
      stops: STOPS,
      shapes: {
        SH1: { xy: SHAPE.xy, dist: SHAPE.xy.map(([x]) => x) },
        SH2: { xy: SHAPE.xy, dist: SHAPE.xy.map(([x]) => x) },
        SK: { xy: SHAPE.xy, dist: SHAPE.xy.map(([x]) => x / 1000) },
      },
      trips: [
        { id: 'm1', shape: 'SH1', times: ['A', 'B', 'C'].map((stop, i) => ({ stop, arr: 3600 + i * 60, dist: [0, 310, 600][i] })) },
        {
          id: 'm2',
          shape: 'SH2',
          dir: 1,
          times: ['A', 'C', 'E'].map((stop, i) => ({ stop, arr: 3600 + i * 60, dist: [0, 600, 1200][i] })),
        },
        {
          id: 'k1',
          shape: 'SK',
          route: 'R2',
          times: ['A', 'B', 'D'].map((stop, i) => ({ stop, arr: 3600 + i * 60, dist: [0, 0.31, 0.9][i] })),
        },
      ],
    });
    const set = buildPatterns(feed, { warnings });
    expect(set.shapeDistUnit!.unit).toBe('m');
    const km = set.patterns.find((p) => p.tripIds[0] === 'k1')!;
    expect(km.distanceSource).toBe('shape_dist_traveled');
    expect(km.distAlongM[1]).toBeCloseTo(310, 9);
    expect(km.lengthM).toBeCloseTo(900, 9);
    expect(set.patterns.find((p) => p.tripIds[0] === 'm1')!.distAlongM[1]).toBeCloseTo(310, 9);
    expect(warnings.list().find((w) => w.code === 'shape-dist-unit-per-shape')!.examples).toEqual(['SK in km']);
  });

  it('records a decreasing shape_dist_traveled and measures that pattern by projection', () => {
    const warnings = new WarningSink();
    const feed = handFeed({
      stops: STOPS,
      shapes: { SH1: { xy: SHAPE.xy, dist: SHAPE.xy.map(([x]) => x) } },
      trips: [
        { id: 'b1', shape: 'SH1', times: ['A', 'B', 'C'].map((stop, i) => ({ stop, arr: 3600 + i * 60, dist: [0, 350, 300][i] })) },
        { id: 'g1', shape: 'SH1', times: ['A', 'D'].map((stop, i) => ({ stop, arr: 3600 + i * 60, dist: [0, 900][i] })) },
      ],
    });
    const set = buildPatterns(feed, { warnings });
    const bad = set.patterns.find((p) => p.tripIds[0] === 'b1')!;
    expect(bad.distanceSource).toBe('shape_projection');
    expect(set.distanceBacktracks).toEqual([{ patternId: bad.id, tripId: 'b1', stopIndex: 2 }]);
    expect(warnings.list().find((w) => w.code === 'distance-backtrack')!.count).toBe(1);
    expect(set.patterns.find((p) => p.tripIds[0] === 'g1')!.distanceSource).toBe('shape_dist_traveled');
  });

  it('warns when shape_dist_traveled fits no unit well', () => {
    const warnings = new WarningSink();
    const feed = handFeed({
      stops: STOPS,
      shapes: { SH1: { xy: SHAPE.xy, dist: SHAPE.xy.map(([x]) => x * 1.09) } },
      trips: [{ id: 'p1', shape: 'SH1', times: ['A', 'E'].map((stop, i) => ({ stop, arr: 3600 + i * 300, dist: [0, 1308][i] })) }],
    });
    const set = buildPatterns(feed, { warnings });
    expect(set.shapeDistUnit!.unit).toBe('m');
    expect(warnings.list().map((w) => w.code)).toContain('shape-dist-unit-poor-fit');
  });
});

describe('buildPatterns: frequencies, stops and times', () => {
  it('expands frequencies into trips per day and counts nominal ones', () => {
    const feed = handFeed({
      stops: STOPS,
      trips: [run('f1', ['A', 'B', 'C'], 0), run('f2', ['A', 'B', 'C'], 0), run('p1', ['A', 'B', 'C'], 3600)],
      frequencies: [
        // exact_times=1: starts at 06:00, 06:10, ..., 06:50 (before 07:00): 6 trips.
        { tripId: 'f1', startS: 21600, endS: 25200, headwayS: 600, exactTimes: 1 },
        // exact_times=0: a nominal 15-minute headway for an hour: 4 trips.
        { tripId: 'f2', startS: 25200, endS: 28800, headwayS: 900, exactTimes: 0 },
      ],
      shapes: { SH1: SHAPE },
    });
    const p = buildPatterns(feed).patterns[0];
    expect(p.tripsPerDay).toBe(6 + 4 + 1);
    expect(p.nominalFrequencyTrips).toBe(4);
  });

  it('keeps stops with no pickup and no drop-off for geometry but not as passenger stops', () => {
    const feed = handFeed({
      stops: STOPS,
      shapes: { SH1: SHAPE },
      trips: [{ id: 'n1', shape: 'SH1', times: ['A', 'B', 'C'].map((stop, i) => ({ stop, arr: 3600 + i * 60, noService: stop === 'B' })) }],
    });
    const p = buildPatterns(feed).patterns[0];
    expect(p.stopIdx).toHaveLength(3);
    expect(p.passengerStop).toEqual([true, false, true]);
  });

  it('interpolates blank times by distance and marks the gaps, and takes the median over trips', () => {
    // Stops at 0, 300, 600, 900 m (B and C untimed) then E at 1200 m.
    const blank = (id: string, start: number, runS: number): TripSpec => ({
      id,
      shape: 'SH1',
      times: [
        { stop: 'A', arr: start },
        { stop: 'B', arr: null },
        { stop: 'C', arr: null },
        { stop: 'D', arr: start + runS },
        { stop: 'E', arr: start + runS + 100 },
      ],
    });
    const feed = handFeed({
      stops: STOPS,
      shapes: { SH1: SHAPE },
      trips: [blank('i1', 3600, 300), blank('i2', 7200, 360), blank('i3', 9000, 390)],
    });
    const p = buildPatterns(feed).patterns[0];
    // Median run A..D is 360 s, split evenly over three 300 m gaps [D].
    expect(p.gapRunTimeS[0]).toBeCloseTo(120, 0);
    expect(p.gapRunTimeS[1]).toBeCloseTo(120, 0);
    expect(p.gapRunTimeS[3]).toBe(100);
    expect(p.gapTimeInterpolated).toEqual([true, true, true, false]);
    expect(p.timepoint).toEqual([true, false, false, true, true]);
    expect(p.runTimeS).toBe(460);
  });
});

describe('buildPatterns: missing shapes and blank directions', () => {
  it('falls back to straight lines for a shape_id that shapes.txt lacks, counting warnings', () => {
    const warnings = new WarningSink();
    const feed = handFeed({ stops: STOPS, trips: [run('u1', ['A', 'B', 'C'], 0, { shape: 'GONE', dir: -1 })] });
    const p = buildPatterns(feed, { warnings }).patterns[0];
    expect(p.id).toBe('V1::1'); // a blank direction_id stays blank in the id
    expect(p.directionId).toBe(-1);
    expect(p.distanceSource).toBe('great_circle');
    expect(p.shapeId).toBe('');
    expect(buildPatterns(feed).warnings!.map((w) => w.code)).toEqual(['unknown-shape', 'pattern-without-shape']);
    expect(warnings.list().map((w) => [w.code, w.count])).toEqual([
      ['unknown-shape', 1],
      ['pattern-without-shape', 1],
    ]);
  });

  it('picks the most common shape among the trips as the representative one', () => {
    const bent = { xy: [...line(0, 0, 600, 0), ...line(600, 0, 600, 40).slice(1), ...line(600, 40, 1200, 40).slice(1)] };
    const feed = handFeed({
      stops: STOPS,
      shapes: { SH1: SHAPE, SH2: bent },
      trips: [run('s1', ['A', 'C', 'E'], 0, { shape: 'SH2' }), run('s2', ['A', 'C', 'E'], 600), run('s3', ['A', 'C', 'E'], 1200)],
    });
    const p = buildPatterns(feed).patterns[0];
    expect(p.shapeId).toBe('SH1');
    expect(p.lengthM).toBeCloseTo(1200, -1);
  });
});

describe('buildPatterns: options and errors', () => {
  const feed = handFeed({
    stops: STOPS,
    shapes: { SH1: SHAPE },
    trips: [run('a', ['A', 'B'], 0), run('b', ['C', 'D'], 0, { route: 'V2' })],
  });

  it('keeps only the routes asked for', () => {
    expect(buildPatterns(feed, { routes: ['V2'] }).patterns.map((p) => p.id)).toEqual(['V2:0:1']);
  });

  it('also takes a route_short_name', () => {
    feed.routes.get('V2')!.shortName = '22';
    expect(buildPatterns(feed, { routes: ['22'] }).patterns.map((p) => p.id)).toEqual(['V2:0:1']);
  });

  it('rejects an unknown route, naming it', () => {
    expect(() => buildPatterns(feed, { routes: ['V9'] })).toThrow(StopspanError);
    expect(() => buildPatterns(feed, { routes: ['V9'] })).toThrow(/routes.*V9/);
  });

  it('rejects a date other than the one the feed was read for', () => {
    try {
      buildPatterns(feed, { date: '2026-10-15' });
      expect.unreachable();
    } catch (e) {
      expect((e as StopspanError).code).toBe('bad-option');
    }
  });

  it('filters by service itself when the feed kept every trip', () => {
    const all = handFeed({
      date: null,
      stops: STOPS,
      trips: [run('wk', ['A', 'B'], 0), run('sa', ['A', 'B'], 0, { service: 'SA' })],
      calendar: [
        { serviceId: 'WK', days: [true, true, true, true, true, false, false], start: '20260101', end: '20271231' },
        { serviceId: 'SA', days: [false, false, false, false, false, true, false], start: '20260101', end: '20271231' },
      ],
      calendarDates: [
        { serviceId: 'SA', date: '20261014', exceptionType: 1 },
        { serviceId: 'WK', date: '20261014', exceptionType: 2 },
      ],
    });
    // 2026-10-14 is a Wednesday: WK is removed and SA added by calendar_dates.
    expect(buildPatterns(all, { date: '2026-10-14' }).patterns.flatMap((p) => p.tripIds)).toEqual(['sa']);
    expect(buildPatterns(all, { date: '2026-10-13' }).patterns.flatMap((p) => p.tripIds)).toEqual(['wk']);
    expect(() => buildPatterns(all)).toThrow(/date/);
  });

  it('throws empty-feed when nothing runs', () => {
    const none = handFeed({ stops: STOPS, trips: [run('sa', ['A', 'B'], 0, { service: 'SA' })] });
    expect(() => buildPatterns(none)).toThrow(expect.objectContaining({ code: 'empty-feed' }));
  });

  it('reports progress', () => {
    const events: number[] = [];
    buildPatterns(feed, { onProgress: (e) => events.push(e.done!) });
    expect(events).toEqual([2]);
  });
});

describe('buildPatterns: caps on patterns', () => {
  // a grid of stops 50 m apart and two-stop trips between distinct pairs: each trip its own pattern
  function twoStopFeed(trips: number) {
    const side = Math.ceil(Math.sqrt(trips)) + 1;
    const stops: Record<string, [number, number]> = {};
    for (let k = 0; k < side; k++) stops[`P${k}`] = [(k % 40) * 50, Math.floor(k / 40) * 50];
    const specs: TripSpec[] = [];
    for (let a = 0; a < side && specs.length < trips; a++) {
      for (let b = 0; b < side && specs.length < trips; b++) {
        if (a !== b)
          specs.push({
            id: `t${specs.length}`,
            times: [
              { stop: `P${a}`, arr: 3600 },
              { stop: `P${b}`, arr: 3720 },
            ],
          });
      }
    }
    return handFeed({ stops, trips: specs });
  }

  it(`refuses more than ${MAX_PATTERNS} patterns as too large, and measures that many`, () => {
    const over = twoStopFeed(MAX_PATTERNS + 1);
    let e: unknown;
    try {
      buildPatterns(over);
    } catch (x) {
      e = x;
    }
    expect(e).toBeInstanceOf(StopspanError);
    expect((e as StopspanError).code).toBe('feed-too-large');
    expect((e as StopspanError).message).toContain('--routes');
    expect(buildPatterns(twoStopFeed(MAX_PATTERNS)).patterns).toHaveLength(MAX_PATTERNS);
  });

  it(`refuses more than ${MAX_PATTERN_STOPS} stops over all patterns`, () => {
    // eleven trips of 10 000 stops (the cap per trip), each its own pattern: 110 000 pattern stops
    const stops: Record<string, [number, number]> = {};
    for (let k = 0; k < 10_011; k++) stops[`Q${k}`] = [k * 100, 0];
    const specs: TripSpec[] = Array.from({ length: 11 }, (_, j) => ({
      id: `long${j}`,
      times: Array.from({ length: 10_000 }, (_, q) => ({ stop: `Q${q + j}`, arr: q === 0 ? 3600 : q === 9_999 ? 3600 + 20_000 : null })),
    }));
    let e: unknown;
    try {
      buildPatterns(handFeed({ stops, trips: specs }));
    } catch (x) {
      e = x;
    }
    expect((e as StopspanError).code).toBe('feed-too-large');
    expect((e as StopspanError).message).toContain(String(MAX_PATTERN_STOPS));
  });
});

describe('buildPatterns: shapes with no length and stops that cannot be where they say', () => {
  it('measures straight lines for a shape whose points all lie at one place, and says so by name', () => {
    const flat = {
      xy: [
        [600, 0],
        [600, 0],
        [600, 0],
        [600, 0],
      ] as [number, number][],
    };
    const feed = handFeed({ stops: STOPS, shapes: { SH1: flat }, trips: [run('z1', ['A', 'C', 'E'], 0)] });
    const warnings = new WarningSink();
    const p = buildPatterns(feed, { warnings }).patterns[0];
    expect(p.distanceSource).toBe('great_circle');
    // A to E is 1200 m east along the street [D: handFeed places stops by metres east of the centre]
    expect(p.lengthM).toBeCloseTo(1200, -1);
    const w = warnings.list().find((x) => x.code === 'shape-zero-length');
    expect(w?.count).toBe(1);
    expect(w?.examples).toEqual(['SH1']);
  });

  it('leaves a stop at a pole out of the distances, places it between its neighbours and counts it', () => {
    const feed = handFeed({ stops: STOPS, shapes: { SH1: SHAPE }, trips: [run('p1', ['A', 'B', 'C', 'D', 'E'], 0)] });
    const c = feed.stops[feed.stopIndex.get('C')!];
    c.lat = 89.99; // a stop typed at the North Pole
    const warnings = new WarningSink();
    const p = buildPatterns(feed, { warnings }).patterns[0];
    expect(p.distAlongM.map((d) => Math.round(d))).toEqual([0, 300, 600, 900, 1200]);
    expect(p.offsetFromShapeM[2]).toBeNull();
    const w = warnings.list().find((x) => x.code === 'stop-coordinate-fault');
    expect(w).toMatchObject({ count: 1, examples: ['C'] });
  });

  it('on a northbound shape, where the pole is nearest its far end: the stops after it keep their places', () => {
    // projected, a stop at the pole lands on the shape's northern end and the forward search pulls every
    // later stop there (gaps 900, 0, 0, ... before this rule)
    const north: Record<string, [number, number]> = { A: [6, 0], B: [6, 300], C: [6, 600], D: [6, 900], E: [6, 1200] };
    const feed = handFeed({ stops: north, shapes: { SH1: { xy: line(0, 0, 0, 1200) } }, trips: [run('n1', ['A', 'B', 'C', 'D', 'E'], 0)] });
    feed.stops[feed.stopIndex.get('B')!].lat = 90;
    const p = buildPatterns(feed).patterns[0];
    expect(p.distAlongM.map((d) => Math.round(d))).toEqual([0, 300, 600, 900, 1200]);
  });

  it('does the same without a shape: the great-circle distances skip the faulty stop', () => {
    const feed = handFeed({ stops: STOPS, trips: [run('p2', ['A', 'B', 'C', 'D', 'E'], 0, { shape: '' })] });
    feed.stops[feed.stopIndex.get('B')!].lat = -89.5;
    feed.stops[feed.stopIndex.get('D')!].lon = 0; // a placeholder zero
    const warnings = new WarningSink();
    const p = buildPatterns(feed, { warnings }).patterns[0];
    const s = (id: string) => feed.stops[feed.stopIndex.get(id)!];
    const ac = haversineM(s('A').lat, s('A').lon, s('C').lat, s('C').lon);
    const ce = haversineM(s('C').lat, s('C').lon, s('E').lat, s('E').lon);
    expect(p.distAlongM[2]).toBeCloseTo(ac, 6);
    expect(p.distAlongM[4]).toBeCloseTo(ac + ce, 6);
    expect(p.distAlongM[1]).toBeCloseTo(ac / 2, 6); // halfway, by order
    expect(p.path).toHaveLength(3);
    expect(warnings.list().find((x) => x.code === 'stop-coordinate-fault')?.count).toBe(2);
  });
});
