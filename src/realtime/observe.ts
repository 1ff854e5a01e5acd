// Compact per-trip-instance state built from the snapshots: the last explicit arrival and departure
// per stop from TripUpdates (kept until the stop leaves the feed), and the STOPPED_AT observations from
// VehiclePositions that bracket each dwell to the polling interval. Typed arrays, one set per instance.

import { EVENT_EXPLICIT, type StopEvents } from './resolveStopTimeUpdates.js';

export class TripInstanceState {
  readonly n: number;
  /** Last explicit arrival / departure seen in a TripUpdate, POSIX seconds; NaN where never seen. */
  readonly arrS: Float64Array;
  readonly depS: Float64Array;
  /** 1 where that last value was already in the past when reported (a measured event, not a prediction). */
  readonly arrMeasured: Uint8Array;
  readonly depMeasured: Uint8Array;
  /** VehiclePositions: first and last STOPPED_AT observation at the stop. */
  readonly stoppedFirstS: Float64Array;
  readonly stoppedLastS: Float64Array;
  /** Last observation before the vehicle was stopped at the stop, first observation after it left. */
  readonly beforeS: Float64Array;
  readonly afterS: Float64Array;
  /** Seconds between the two observations that saw the vehicle pass the stop without STOPPED_AT there; NaN if not seen. */
  readonly passGapS: Float32Array;
  lastTripUpdateS = -Infinity;
  lastVehicleS = -Infinity;
  /** The previous VehiclePosition: stop position (-1 before any), whether stopped there, when. */
  prevPos = -1;
  prevStopped = false;
  prevT = NaN;

  constructor(n: number) {
    this.n = n;
    this.arrS = new Float64Array(n).fill(NaN);
    this.depS = new Float64Array(n).fill(NaN);
    this.arrMeasured = new Uint8Array(n);
    this.depMeasured = new Uint8Array(n);
    this.stoppedFirstS = new Float64Array(n).fill(NaN);
    this.stoppedLastS = new Float64Array(n).fill(NaN);
    this.beforeS = new Float64Array(n).fill(NaN);
    this.afterS = new Float64Array(n).fill(NaN);
    this.passGapS = new Float32Array(n).fill(NaN);
  }
}

/**
 * Folds one resolved TripUpdate into the state: every stop named explicitly overwrites the stop's last
 * arrival and departure, so what remains when the stop leaves the feed is the last report of it.
 * Propagated delays are predictions for other stops and are not kept.
 */
export function observeTripUpdate(state: TripInstanceState, events: StopEvents, reportedAtS: number): void {
  for (let i = 0; i < state.n; i++) {
    if (events.source[i] !== EVENT_EXPLICIT) continue;
    const a = events.arrS[i];
    const d = events.depS[i];
    if (Number.isFinite(a)) {
      state.arrS[i] = a;
      state.arrMeasured[i] = a <= reportedAtS ? 1 : 0;
    }
    if (Number.isFinite(d)) {
      state.depS[i] = d;
      state.depMeasured[i] = d <= reportedAtS ? 1 : 0;
    }
  }
  state.lastTripUpdateS = reportedAtS;
}

/**
 * Folds one VehiclePosition (stop position, STOPPED_AT or not, observation time) into the state.
 * Observations must come in time order (the caller drops older ones). Not stopped at position p means
 * between stops p-1 and p (IN_TRANSIT_TO or INCOMING_AT p).
 */
export function observeVehiclePosition(state: TripInstanceState, pos: number, stopped: boolean, tS: number): void {
  const { prevPos, prevStopped, prevT } = state;
  const hasPrev = prevPos >= 0;
  if (stopped) {
    if (Number.isNaN(state.stoppedFirstS[pos])) {
      state.stoppedFirstS[pos] = tS;
      if (hasPrev && (prevPos < pos || (prevPos === pos && !prevStopped))) state.beforeS[pos] = prevT;
    }
    state.stoppedLastS[pos] = tS;
  }
  if (hasPrev && pos > prevPos) {
    if (prevStopped && Number.isNaN(state.afterS[prevPos])) state.afterS[prevPos] = tS;
    // stops passed between the two observations without a STOPPED_AT there
    const firstAhead = prevStopped ? prevPos + 1 : prevPos;
    const lastPassed = pos - 1;
    for (let c = firstAhead; c <= lastPassed; c++) {
      if (Number.isNaN(state.stoppedFirstS[c]) && Number.isNaN(state.passGapS[c])) state.passGapS[c] = tS - prevT;
    }
  }
  if (!hasPrev || pos >= prevPos) {
    state.prevPos = pos;
    state.prevStopped = stopped;
  }
  state.prevT = tS;
  state.lastVehicleS = tS;
}

export interface StopVerdict {
  /** true stopped, false passed without stopping, null unknown. */
  stopped: boolean | null;
  /** Dwell in seconds where stopped and measurable, else null. */
  dwellS: number | null;
  /** 'trip-update' or 'vehicle-position': where the dwell came from. */
  dwellFrom: 'trip-update' | 'vehicle-position' | null;
}

export interface VerdictOptions {
  /** A TripUpdate dwell (departure - arrival) at or above this means the bus stopped. */
  minDwellS: number;
  /** A VehiclePosition pass counts as "did not stop" only when the observations around it are at most this far apart. */
  passMaxGapS: number;
  /** Use TripUpdate times only when they were already past when reported (measured, not predicted). */
  measuredOnly: boolean;
}

function tuArr(state: TripInstanceState, i: number, measuredOnly: boolean): number {
  return measuredOnly && !state.arrMeasured[i] ? NaN : state.arrS[i];
}

function tuDep(state: TripInstanceState, i: number, measuredOnly: boolean): number {
  return measuredOnly && !state.depMeasured[i] ? NaN : state.depS[i];
}

/**
 * Whether the vehicle stopped at stop position i and for how long. A TripUpdate dwell of at least
 * minDwellS is taken as it is; otherwise STOPPED_AT observations give the dwell as the midpoint of its
 * bracket: at least (last - first STOPPED_AT), at most (first seen after - last seen before), which with
 * polling interval T and k observations is [(k-1)T, (k+1)T], midpoint kT.
 */
export function stopVerdict(state: TripInstanceState, i: number, opts: VerdictOptions): StopVerdict {
  const a = tuArr(state, i, opts.measuredOnly);
  const d = tuDep(state, i, opts.measuredOnly);
  const tuDwell = Number.isFinite(a) && Number.isFinite(d) ? d - a : NaN;
  if (tuDwell >= opts.minDwellS) return { stopped: true, dwellS: tuDwell, dwellFrom: 'trip-update' };
  const first = state.stoppedFirstS[i];
  if (Number.isFinite(first)) {
    const lower = state.stoppedLastS[i] - first;
    const before = state.beforeS[i];
    const after = state.afterS[i];
    if (Number.isFinite(before) && Number.isFinite(after)) {
      return { stopped: true, dwellS: (lower + (after - before)) / 2, dwellFrom: 'vehicle-position' };
    }
    return { stopped: true, dwellS: null, dwellFrom: null };
  }
  if (Number.isFinite(tuDwell)) return { stopped: false, dwellS: null, dwellFrom: null };
  const gap = state.passGapS[i];
  if (Number.isFinite(gap) && gap <= opts.passMaxGapS) return { stopped: false, dwellS: null, dwellFrom: null };
  return { stopped: null, dwellS: null, dwellFrom: null };
}

/**
 * Run time over gap i (stop i to stop i+1), seconds: TripUpdate departure at i to arrival at i+1, else
 * from VehiclePositions when the vehicle was seen stopped at both ends (midpoints of the leaving and
 * arriving brackets); null when neither is known.
 */
export function gapRunTime(state: TripInstanceState, i: number, measuredOnly = true): number | null {
  const d = tuDep(state, i, measuredOnly);
  const a = tuArr(state, i + 1, measuredOnly);
  if (Number.isFinite(d) && Number.isFinite(a)) return a - d;
  const leftLast = state.stoppedLastS[i];
  const leftAfter = state.afterS[i];
  const arrBefore = state.beforeS[i + 1];
  const arrFirst = state.stoppedFirstS[i + 1];
  if ([leftLast, leftAfter, arrBefore, arrFirst].every(Number.isFinite)) {
    return (arrBefore + arrFirst) / 2 - (leftLast + leftAfter) / 2;
  }
  return null;
}
