// scheduledTimes: run time per gap, dwell and whole run as medians over trips, with blank times
// interpolated by distance and marked.

import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { scheduledTimes, scheduledTimesOfRuns } from '../../src/network/scheduledTimes.js';
import { WarningSink } from '../../src/common/warnings.js';
import type { TripStopTimes } from '../../src/gtfs/types.js';

/** One trip's stop times from [arrival, departure] pairs (-1 = blank). */
function trip(times: [number, number][]): TripStopTimes {
  const n = times.length;
  return {
    stopIdx: Int32Array.from(times, (_, i) => i),
    seq: Int32Array.from(times, (_, i) => i + 1),
    arrS: Int32Array.from(times, (t) => t[0]),
    depS: Int32Array.from(times, (t) => t[1]),
    shapeDist: new Float64Array(n).fill(NaN),
    timepoint: Uint8Array.from(times, (t) => (t[0] >= 0 ? 1 : 0)),
    noService: new Uint8Array(n),
  };
}

describe('scheduledTimes', () => {
  it('takes gap run times from departure to the next arrival, and dwell from arrival to departure', () => {
    const r = scheduledTimes(
      [
        trip([
          [0, 0],
          [90, 120],
          [300, 300],
        ]),
      ],
      [0, 400, 900],
    );
    expect(r.gapRunTimeS).toEqual([90, 180]);
    expect(r.scheduledDwellS).toEqual([0, 30, 0]);
    expect(r.runTimeS).toBe(300);
    expect(r.gapTimeInterpolated).toEqual([false, false]);
  });

  it('uses the median over trips, not the mean', () => {
    const trips = [0, 1, 2].map((k) =>
      trip([
        [0, 0],
        [[60, 60, 600][k], [60, 60, 600][k]],
      ]),
    );
    expect(scheduledTimes(trips, [0, 300]).gapRunTimeS).toEqual([60]);
  });

  it('interpolates blank stops by distance between the surrounding timed stops, and marks the gaps', () => {
    // 100 m then 300 m to a stop 400 s after the start: the blank stop is a quarter of the way [D].
    const r = scheduledTimes(
      [
        trip([
          [0, 0],
          [-1, -1],
          [400, 400],
          [500, 500],
        ]),
      ],
      [0, 100, 400, 600],
    );
    expect(r.gapRunTimeS).toEqual([100, 300, 100]);
    expect(r.gapTimeInterpolated).toEqual([true, true, false]);
  });

  it('falls back to equal shares when the timed stops are at the same distance', () => {
    const r = scheduledTimes(
      [
        trip([
          [0, 0],
          [-1, -1],
          [60, 60],
        ]),
      ],
      [0, 0, 0],
    );
    expect(r.gapRunTimeS).toEqual([30, 30]);
  });

  it('fills a blank arrival or departure from the other one', () => {
    const r = scheduledTimes(
      [
        trip([
          [-1, 0],
          [100, -1],
          [200, 210],
          [300, -1],
        ]),
      ],
      [0, 1, 2, 3],
    );
    expect(r.gapRunTimeS).toEqual([100, 100, 90]);
    expect(r.scheduledDwellS).toEqual([0, 0, 10, 0]);
  });

  it('leaves out a trip with a blank end, counting it', () => {
    const warnings = new WarningSink();
    const r = scheduledTimes(
      [
        trip([
          [0, 0],
          [-1, -1],
        ]),
        trip([
          [0, 0],
          [80, 80],
        ]),
      ],
      [0, 500],
      { warnings, tripIds: ['bad', 'good'] },
    );
    expect(r.gapRunTimeS).toEqual([80]);
    expect(warnings.list()).toEqual([{ code: 'untimed-trip-end', message: expect.any(String), count: 1, examples: ['bad'] }]);
  });

  it('rejects trips whose length differs from the distances', () => {
    expect(() => scheduledTimes([trip([[0, 0]])], [0, 100])).toThrow(/2 stop times/);
  });
});

describe('scheduledTimesOfRuns', () => {
  it('counts a run shared by several trips as that many trips: the same medians as trip by trip', () => {
    // reference: scheduledTimes over the trips one by one, each run repeated by its count
    const timeArb = fc.oneof({ weight: 1, arbitrary: fc.constant(-1) }, { weight: 4, arbitrary: fc.integer({ min: 0, max: 5000 }) });
    const runArb = fc.record({
      times: fc.array(fc.tuple(timeArb, timeArb), { minLength: 3, maxLength: 3 }),
      trips: fc.integer({ min: 1, max: 4 }),
    });
    fc.assert(
      fc.property(fc.array(runArb, { minLength: 1, maxLength: 6 }), (runs) => {
        const dist = [0, 250, 900];
        const expanded = runs.flatMap((r) => Array.from({ length: r.trips }, () => trip(r.times as [number, number][])));
        const want = scheduledTimes(expanded, dist);
        const got = scheduledTimesOfRuns(
          runs.map((r) => ({ arrS: r.times.map((t) => t[0]), depS: r.times.map((t) => t[1]), trips: r.trips })),
          dist,
        );
        expect(got.times).toEqual(want);
        expect(got.untimed.length).toBe(runs.length);
      }),
      { numRuns: 300, seed: 12 },
    );
  });
});
