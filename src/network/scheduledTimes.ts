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
  const { times, untimed } = scheduledTimesOfRuns(trips.map((st) => ({ arrS: st.arrS, depS: st.depS, trips: 1 })), distAlongM);
  untimed.forEach((u, k) => {
    if (u && warnings) warnUntimedTrip(warnings, tripIds?.[k]);
  });
  return times;
}

/** The warning for a trip left out of the scheduled times: no time at its first or last stop. */
export function warnUntimedTrip(warnings: WarningSink, tripId: string | undefined): void {
  warnings.add('untimed-trip-end', 'trip whose first or last stop has no time; its run times are left out', tripId);
}

/**
 * The same over runs of rows shared by several trips, each counted as often as it runs: medians equal
 * those over the trips one by one. `untimed` marks the runs left out (no time at the first or last stop).
 * Times may count from any origin per run: only differences are taken.
 */
export function scheduledTimesOfRuns(runs: TimedRun[], distAlongM: number[]): { times: ScheduledTimes; untimed: boolean[] } {
  const n = distAlongM.length;
  const gapSamples: WeightedSamples[] = Array.from({ length: n - 1 }, () => new WeightedSamples());
  const dwellSamples: WeightedSamples[] = Array.from({ length: n }, () => new WeightedSamples());
  const runSamples = new WeightedSamples();
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
    const w = run.trips;
    for (let i = 0; i < n - 1; i++) {
      gapSamples[i].add(arr[i + 1] - dep[i], w);
      if (filled[i] || filled[i + 1]) interpolated[i] = true;
    }
    for (let i = 0; i < n; i++) dwellSamples[i].add(dep[i] - arr[i], w);
    runSamples.add(arr[n - 1] - dep[0], w);
  }
  return {
    times: {
      gapRunTimeS: gapSamples.map((g) => g.median()),
      gapTimeInterpolated: interpolated,
      runTimeS: runSamples.median(),
      scheduledDwellS: dwellSamples.map((d) => d.median()),
    },
    untimed: untimedRuns,
  };
}

/** Values with counts; the median is that of the values repeated by their counts. */
class WeightedSamples {
  private values: number[] = [];
  private counts: number[] = [];
  private total = 0;

  add(v: number, count: number): void {
    this.values.push(v);
    this.counts.push(count);
    this.total += count;
  }

  median(): number {
    if (this.total === 0) return NaN;
    const v = this.values;
    const c = this.counts;
    // insertion sort of the (value, count) pairs: a pattern has few distinct runs, and this allocates
    // nothing (a comparator sort of an index array, allocated per call, led the pattern stage's profile)
    for (let i = 1; i < v.length; i++) {
      const x = v[i];
      const w = c[i];
      let j = i - 1;
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
    for (let k = 0; k < v.length; k++) {
      const next = seen + c[k];
      if (lo >= seen && lo < next) atLo = v[k];
      if (hi >= seen && hi < next) return hi === lo ? atLo : (atLo + v[k]) / 2;
      seen = next;
    }
    return NaN;
  }
}

/** Median of the values (NaN for none). */
export function median(xs: number[]): number {
  if (xs.length === 0) return NaN;
  const s = Float64Array.from(xs).sort();
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}
