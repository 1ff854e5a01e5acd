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
  const n = distAlongM.length;
  for (const st of trips) {
    if (st.stopIdx.length !== n) {
      throw new RangeError(`scheduledTimes: every trip needs ${n} stop times (one per distance), got ${st.stopIdx.length}`);
    }
  }
  const gapSamples: number[][] = Array.from({ length: n - 1 }, () => []);
  const dwellSamples: number[][] = Array.from({ length: n }, () => []);
  const runSamples: number[] = [];
  const interpolated = new Array<boolean>(n - 1).fill(false);
  const arr = new Float64Array(n);
  const dep = new Float64Array(n);
  const filled = new Uint8Array(n);
  trips.forEach((st, k) => {
    for (let i = 0; i < n; i++) {
      const a = st.arrS[i];
      const dd = st.depS[i];
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
    if (untimed) {
      warnings?.add('untimed-trip-end', 'trip whose first or last stop has no time; its run times are left out', tripIds?.[k]);
      return;
    }
    for (let i = 0; i < n - 1; i++) {
      gapSamples[i].push(arr[i + 1] - dep[i]);
      if (filled[i] || filled[i + 1]) interpolated[i] = true;
    }
    for (let i = 0; i < n; i++) dwellSamples[i].push(dep[i] - arr[i]);
    runSamples.push(arr[n - 1] - dep[0]);
  });
  return {
    gapRunTimeS: gapSamples.map(median),
    gapTimeInterpolated: interpolated,
    runTimeS: median(runSamples),
    scheduledDwellS: dwellSamples.map(median),
  };
}

/** Median of the values (NaN for none). */
export function median(xs: number[]): number {
  if (xs.length === 0) return NaN;
  const s = Float64Array.from(xs).sort();
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}
