// Fleet and frequency arithmetic against a hand-computed example, and the route figures on a hand-made feed.
import { describe, expect, it } from 'vitest';
import { fleetFigures, headways } from '../../src/model/fleet.js';

describe('fleetFigures', () => {
  it('60 min round trip at a 10 min peak headway, saving 6 min per round trip', () => {
    // [D] vehicles = ceil(cycle / headway): ceil(60 / 10) = 6 today; ceil(54 / 10) = ceil(5.4) = 6 after,
    // so a 6 min saving frees no whole vehicle at a 10 min headway (it is worth 6 / 10 = 0.6 of one); the
    // same 6 vehicles on a 54 min cycle come every 54 / 6 = 9 min, and half the 1 min headway change is
    // 30 s of waiting saved per boarding (half the headway per boarding: common planning practice).
    const f = fleetFigures(3600, 360, 600);
    expect(f.vehiclesBefore).toBe(6);
    expect(f.vehiclesAfter).toBe(6);
    expect(f.vehiclesFreed).toBe(0);
    expect(f.vehicleShareFreed).toBeCloseTo(0.6, 12);
    expect(f.headwaySameFleetS).toBeCloseTo(540, 9);
    expect(f.waitSavedPerBoardingS).toBeCloseTo(30, 9);
    // [D] a whole vehicle is freed once the saving reaches one headway: ceil(50 / 10) = 5, 6 - 5 = 1
    const g = fleetFigures(3600, 600, 600);
    expect(g.vehiclesFreed).toBe(1);
    expect(g.headwaySameFleetS).toBeCloseTo(500, 9);
    // nothing saved, nothing changes
    const z = fleetFigures(3600, 0, 600);
    expect([z.vehiclesFreed, z.headwaySameFleetS, z.waitSavedPerBoardingS]).toEqual([0, 600, 0]);
  });

  it('finds the peak headway in the busiest hour and the mean over the day', () => {
    // [D] departures every 20 min from 06:00, every 10 min 07:00-08:00: 6 in the busiest hour -> 10 min
    const deps = [21600, 22800, 24000, 25200, 25800, 26400, 27000, 27600, 28200, 28800, 30000];
    const h = headways(deps)!;
    expect(h.peakS).toBeCloseTo(600, 9);
    expect(h.meanS).toBeCloseTo((30000 - 21600) / 10, 9);
    expect(headways([3600])).toBeNull();
  });
});
