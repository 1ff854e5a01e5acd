// The what-if engine on a hand-built Vellmoor corridor with uneven neighbours (100 m before, 300 m after the
// stop removed), checked against hand computation: the walk added per trip end a*b/(a+b) = 75 m, the ride
// saving N*P*p with p worked out by hand from the lost-time expression, and the bus time saved.
import { describe, expect, it } from 'vitest';
import { evaluateScenario } from '../../src/whatif/whatif.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { handmadeNetwork } from '../helpers/handmade.js';
import type { ModelParams } from '../../src/model/params.js';

// stops every 200 m, except that the stop at index 5 sits 100 m after its left neighbour and 300 m before its right one
const distM = [0, 200, 400, 600, 800, 900, 1200, 1400, 1600, 1800, 2000, 2200];
const { feed, patterns } = handmadeNetwork({ distM, tripsPerDay: 40, sharedAt: 9 });
const params: Partial<ModelParams> = {
  cruise_speed_mps: 11.176,
  stopping_model: 'always',
  door_time_s: 5,
  accel_mps2: 1.22,
  decel_mps2: 1.22,
  reentry_delay_s: 2,
  walk_speed_mps: 1.2,
  walk_weight: 2,
};

describe('removing one stop between uneven neighbours', () => {
  const audit = runAudit(feed, patterns, { params });
  const stop = audit.stops.find((s) => s.patternId === 'V1:0:1' && s.stopId === 'v1-5')!;
  const r = evaluateScenario(feed, patterns, { remove: ['v1-5'] }, { params });
  const e = r.patterns[0];

  it('adds a*b/(a+b) = 100*300/400 = 75 m of walk per trip end, weighted w/v', () => {
    // [D] design notes section 4, "Removing one stop": 100/300 gives 75 m. By hand: the catchment runs from
    // 50 m before the stop to 150 m after; riders up to 100 m after walk back to the left neighbour, the rest
    // on to the right one; the extra walk integrates to 2500 + 10000 + 2500 = 15000 m over 200 m, i.e. 75 m.
    const ends = stop.boardingsPerDay + stop.alightingsPerDay;
    expect(ends).toBeGreaterThan(0);
    expect(e.walkAddedPaxMinPerDay).toBeCloseTo(((2 / 1.2) * ends * 75) / 60, 6);
    expect(e.walkSavedPaxMinPerDay).toBeCloseTo(0, 9);
    expect(e.ridersAffectedPerDay).toBeCloseTo(ends, 6);
  });

  it('saves N*P*p for the riders on board, p from the lost-time expression worked by hand', () => {
    // [S] lost time per stop = door time + v/2 (1/a + 1/d) + re-entry delay (the HCM 2010 transit delay
    // expression, via the design notes): 5 + 11.176/2 * (2/1.22) + 2 = 16.1607 s at 25 mph (11.176 m/s exactly)
    const p = 5 + (11.176 / 2) * (1 / 1.22 + 1 / 1.22) + 2;
    expect(p).toBeCloseTo(16.1607, 3);
    const N = stop.loadDepartingPerDay - stop.boardingsPerDay; // riders who ride through the stop
    expect(N).toBeGreaterThan(0);
    expect(e.rideSavedPaxMinPerDay).toBeCloseTo((N * 1 * p) / 60, 6); // P = 1: the bus always stops
    expect(e.runTimeSavedPerTripS).toBeCloseTo(p, 6);
    expect(e.vehicleHoursPerDay).toBeCloseTo((p * 40) / 3600, 9);
    expect(e.largestGapAfterM).toBeCloseTo(400, 6);
    expect(e.netPaxMinPerDay).toBeCloseTo(
      e.walkAddedPaxMinPerDay - e.walkSavedPaxMinPerDay - e.rideSavedPaxMinPerDay + e.neighboursExtraPaxMinPerDay,
      9,
    );
  });

  it('weighs the walk in the sensitivity cases in proportion to the walk weight', () => {
    // the walk terms scale with w, the ride terms do not: net(w) = net(2) + (w/2 - 1) * walk terms
    const walkNet = e.walkAddedPaxMinPerDay - e.walkSavedPaxMinPerDay;
    for (const s of r.sensitivity) expect(s.netPaxMinPerDay).toBeCloseTo(e.netPaxMinPerDay + (s.walkWeight / 2 - 1) * walkNet, 6);
  });
});
