// The per-trip-instance state: STOPPED_AT observations bracket a dwell to the polling interval, and
// TripUpdate events are kept as last reported, measured or predicted.

import { describe, expect, it } from 'vitest';
import {
  TripInstanceState,
  observeTripUpdate,
  observeVehiclePosition,
  stopVerdict,
  gapRunTime,
  EVENT_EXPLICIT,
  EVENT_PROPAGATED,
} from '../../src/realtime/index.js';

const OPTS = { minDwellS: 1, passMaxGapS: 10, measuredOnly: true };

/** A bus arriving at stop 1 at arriveS and leaving after dwellS, polled every pollS from phaseS. */
function polled(arriveS: number, dwellS: number, pollS: number, phaseS: number): TripInstanceState {
  const st = new TripInstanceState(3);
  for (let t = phaseS; t < arriveS + dwellS + 3 * pollS; t += pollS) {
    if (t < arriveS - 60) observeVehiclePosition(st, 0, true, t);
    else if (t < arriveS) observeVehiclePosition(st, 1, false, t);
    else if (t < arriveS + dwellS) observeVehiclePosition(st, 1, true, t);
    else observeVehiclePosition(st, 2, false, t);
  }
  return st;
}

describe('VehiclePosition bracketing', () => {
  it('brackets a 45 s dwell polled every 30 s to within one polling interval, and is unbiased over the polling phase', () => {
    // with k STOPPED_AT observations the dwell lies in [(k-1)T, (k+1)T]; the midpoint kT averages to the dwell [D]
    const est: number[] = [];
    for (let phase = 0; phase < 30; phase++) {
      const v = stopVerdict(polled(1000, 45, 30, phase), 1, OPTS);
      expect(v.stopped).toBe(true);
      expect(v.dwellFrom).toBe('vehicle-position');
      expect(Math.abs(v.dwellS! - 45)).toBeLessThanOrEqual(30);
      est.push(v.dwellS!);
    }
    const mean = est.reduce((s, x) => s + x, 0) / est.length;
    expect(Math.abs(mean - 45)).toBeLessThan(0.5);
  });

  it('calls a quickly polled pass without STOPPED_AT "did not stop", and a sparsely polled one unknown', () => {
    const dense = new TripInstanceState(3);
    observeVehiclePosition(dense, 1, false, 100);
    observeVehiclePosition(dense, 2, false, 105);
    expect(stopVerdict(dense, 1, OPTS).stopped).toBe(false);
    const sparse = new TripInstanceState(3);
    observeVehiclePosition(sparse, 1, false, 100);
    observeVehiclePosition(sparse, 2, false, 130);
    expect(stopVerdict(sparse, 1, OPTS).stopped).toBe(null);
  });
});

describe('TripUpdate events', () => {
  function events(arr: number[], dep: number[], source: number[]) {
    return { arrS: Float64Array.from(arr), depS: Float64Array.from(dep), source: Uint8Array.from(source), unplaced: 0 };
  }

  it('keeps the last explicit report of each stop and ignores propagated delays', () => {
    const st = new TripInstanceState(3);
    observeTripUpdate(st, events([1000, 1100, 1200], [1000, 1120, 1200], [EVENT_EXPLICIT, EVENT_EXPLICIT, EVENT_PROPAGATED]), 990);
    observeTripUpdate(st, events([1000, 1105, 1300], [1000, 1130, 1300], [EVENT_EXPLICIT, EVENT_EXPLICIT, EVENT_PROPAGATED]), 1140);
    expect(st.arrS[1]).toBe(1105);
    expect(st.depS[1]).toBe(1130);
    expect(Number.isNaN(st.arrS[2])).toBe(true);
    expect(stopVerdict(st, 1, OPTS)).toEqual({ stopped: true, dwellS: 25, dwellFrom: 'trip-update' });
    expect(gapRunTime(st, 0)).toBe(105);
  });

  it('uses a prediction only when asked to', () => {
    const st = new TripInstanceState(2);
    observeTripUpdate(st, events([1000, 1100], [1000, 1110], [EVENT_EXPLICIT, EVENT_EXPLICIT]), 1050);
    expect(gapRunTime(st, 0, true)).toBe(null); // arrival at stop 1 was still a prediction
    expect(gapRunTime(st, 0, false)).toBe(100);
  });
});
