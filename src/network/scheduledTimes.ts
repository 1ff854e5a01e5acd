// Scheduled times of a pattern from its trips' stop_times: run time per gap, dwell per stop and the whole
// run, each the median over the trips. Blank times are interpolated by distance between the surrounding
// timed stops, and the gaps that needed it are marked.

import type { TripStopTimes } from '../gtfs/types.js';
import type { WarningSink } from '../common/warnings.js';

export interface ScheduledTimes {
  gapRunTimeS: number[];
  /** True where, on any trip, an end of the gap had a blank time filled in by distance. */
  gapTimeInterpolated: boolean[];
  runTimeS: number;
  scheduledDwellS: number[];
}

/** Times of one or more trips with the same rows (seconds; -1 where blank), and how many trips they stand for. */
export interface TimedRun {
  arrS: ArrayLike<number>;
  depS: ArrayLike<number>;
  trips: number;
}

/**
 * Scheduled times of the trips of one pattern (same stops in the same order); distAlongM gives the
 * distances used to interpolate blank times. Trips without a time at the first or last stop are left
 * out and counted as 'untimed-trip-end'. Medians are NaN when no trip is usable.
 */
export function scheduledTimes(
  trips: TripStopTimes[],
  distAlongM: number[],
  options: { warnings?: WarningSink; tripIds?: string[] } = {},
): ScheduledTimes {
  const { warnings, tripIds } = options;
  const { times, untimed } = scheduledTimesOfRuns(
    trips.map((st) => ({ arrS: st.arrS, depS: st.depS, trips: 1 })),
    distAlongM,
  );
  untimed.forEach((u, k) => {
    if (u && warnings) warnUntimedTrip(warnings, tripIds?.[k]);
  });
  return times;
}

/** The warning for a trip left out of the scheduled times: no time at its first or last stop. */
export function warnUntimedTrip(warnings: WarningSink, tripId: string | undefined): void {
  warnings.add('untimed-trip-end', tripId);
}

/**
 * The same over runs of rows shared by several trips, each counted as often as it runs: medians equal
 * those over the trips one by one. `untimed` marks the runs left out (no time at the first or last stop).
 * Times may count from any origin per run: only differences are taken.
 */
export function scheduledTimesOfRuns(runs: TimedRun[], distAlongM: number[]): { times: ScheduledTimes; untimed: boolean[] } {
  const n = distAlongM.length;
  // the usable runs' samples, one row per run: gaps (n - 1), dwells (n) and the whole run, in flat typed
  // arrays (an object and two growing arrays per gap and per stop were 9 MB of garbage per Manhattan audit)
  const R = runs.length;
  const gapAt = new Float64Array(Math.max(0, n - 1) * R);
  const dwellAt = new Float64Array(n * R);
  const runAt = new Float64Array(R);
  const weight = new Float64Array(R);
  let rows = 0;
  const interpolated = new Array<boolean>(n - 1).fill(false);
  const untimedRuns: boolean[] = [];
  const arr = new Float64Array(n);
  const dep = new Float64Array(n);
  const filled = new Uint8Array(n);
  for (const run of runs) {
    if (run.arrS.length !== n || run.depS.length !== n) {
      throw new RangeError(`scheduledTimes: every trip needs ${n} stop times (one per distance), got ${run.arrS.length}`);
    }
    for (let i = 0; i < n; i++) {
      const a = run.arrS[i];
      const dd = run.depS[i];
      arr[i] = a >= 0 ? a : dd;
      dep[i] = dd >= 0 ? dd : a;
      filled[i] = 0;
    }
    // Interpolate blank stops by distance between the surrounding timed stops.
    let prev = -1;
    for (let i = 0; i < n; i++) {
      if (arr[i] < 0) continue;
      if (prev >= 0 && i > prev + 1) {
        const t0 = dep[prev];
        const t1 = arr[i];
        const span = distAlongM[i] - distAlongM[prev];
        for (let j = prev + 1; j < i; j++) {
          const f = span > 0 ? (distAlongM[j] - distAlongM[prev]) / span : (j - prev) / (i - prev);
          arr[j] = dep[j] = t0 + f * (t1 - t0);
          filled[j] = 1;
        }
      }
      prev = i;
    }
    let untimed = false;
    for (let i = 0; i < n; i++) {
      if (arr[i] < 0) untimed = true;
    }
    untimedRuns.push(untimed);
    if (untimed) continue;
    for (let i = 0; i < n - 1; i++) {
      gapAt[rows * (n - 1) + i] = arr[i + 1] - dep[i];
      if (filled[i] || filled[i + 1]) interpolated[i] = true;
    }
    for (let i = 0; i < n; i++) dwellAt[rows * n + i] = dep[i] - arr[i];
    runAt[rows] = arr[n - 1] - dep[0];
    weight[rows] = run.trips;
    rows++;
  }
  const med = new WeightedMedian(rows, weight);
  const gapRunTimeS = new Array<number>(Math.max(0, n - 1));
  for (let i = 0; i < n - 1; i++) gapRunTimeS[i] = med.of(gapAt, i, n - 1);
  const scheduledDwellS = new Array<number>(n);
  for (let i = 0; i < n; i++) scheduledDwellS[i] = med.of(dwellAt, i, n);
  return {
    times: { gapRunTimeS, gapTimeInterpolated: interpolated, runTimeS: med.of(runAt, 0, 1), scheduledDwellS },
    untimed: untimedRuns,
  };
}

/** Medians of columns of samples, one row per run, each row counted by its run's weight (its trips). */
class WeightedMedian {
  private readonly v: Float64Array;
  private readonly c: Float64Array;
  private readonly total: number;

  constructor(
    private readonly rows: number,
    private readonly weight: Float64Array,
  ) {
    this.v = new Float64Array(rows);
    this.c = new Float64Array(rows);
    let total = 0;
    for (let r = 0; r < rows; r++) total += weight[r];
    this.total = total;
  }

  /** The median of column col of a table with `width` columns: that of its values repeated by their weights. */
  of(table: Float64Array, col: number, width: number): number {
    if (this.total === 0) return NaN;
    const v = this.v;
    const c = this.c;
    // insertion sort of the (value, weight) pairs: a pattern has few distinct runs
    for (let r = 0; r < this.rows; r++) {
      const x = table[r * width + col];
      const w = this.weight[r];
      let j = r - 1;
      while (j >= 0 && v[j] > x) {
        v[j + 1] = v[j];
        c[j + 1] = c[j];
        j--;
      }
      v[j + 1] = x;
      c[j + 1] = w;
    }
    // the values at ranks (total - 1) / 2 and total / 2 of the expanded, sorted list
    const lo = (this.total - 1) >> 1;
    const hi = this.total >> 1;
    let seen = 0;
    let atLo = NaN;
    for (let k = 0; k < this.rows; k++) {
      const next = seen + c[k];
      if (lo >= seen && lo < next) atLo = v[k];
      if (hi >= seen && hi < next) return hi === lo ? atLo : (atLo + v[k]) / 2;
      seen = next;
    }
    return NaN;
  }
}
