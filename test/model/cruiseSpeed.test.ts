// The cruise speed that explains a schedule: round trip against a schedule built from a known speed.
import { describe, expect, it } from 'vitest';
import { BOARDING_TIME_PER_PAX_S, estimateCruiseSpeed } from '../../src/model/cruiseSpeed.js';

const kin = { doorTimeS: 3, reentryDelayS: 2, accelMps2: 1.22, decelMps2: 1.22 };

function scheduleS(V: number, D: number, n: number, boardings: number): number {
  // T = D/V + n(t_doors + t_reentry) + (n+1) V (1/2a + 1/2d) + boardings * 2.75 s
  // [C] 2.75 s per boarding: Levinson 1983 (TRR 915), via design notes
  return D / V + n * (kin.doorTimeS + kin.reentryDelayS) + (n + 1) * V * (1 / (2 * kin.accelMps2) + 1 / (2 * kin.decelMps2)) + boardings * 2.75;
}

describe('estimateCruiseSpeed', () => {
  it('recovers the speed a schedule was built from', () => {
    expect(BOARDING_TIME_PER_PAX_S).toBe(2.75);
    for (const V of [6, 9, 12]) {
      const T = scheduleS(V, 8000, 30, 40);
      const est = estimateCruiseSpeed({ runTimeS: T, lengthM: 8000, expectedStopsServed: 30, boardingsPerTrip: 40, ...kin, routeType: 3 });
      expect(est.cruiseSpeedMps).toBeCloseTo(V, 9);
      expect(est.clamped).toBeNull();
    }
  });
  it('clamps a slow schedule to the bus floor and says so', () => {
    const est = estimateCruiseSpeed({ runTimeS: 4000, lengthM: 8000, expectedStopsServed: 30, boardingsPerTrip: 40, ...kin, routeType: 3 });
    expect(est.clamped).toBe('low');
    expect(est.cruiseSpeedMps).toBe(5);
    expect(est.solvedMps).toBeLessThan(5);
  });
  it('clamps a schedule too tight to be explained to the top of the range', () => {
    const est = estimateCruiseSpeed({ runTimeS: 100, lengthM: 8000, expectedStopsServed: 30, boardingsPerTrip: 40, ...kin, routeType: 3 });
    expect(est.clamped).toBe('high');
    expect(est.cruiseSpeedMps).toBe(25);
  });
  it('uses the range of the route type, extended types included', () => {
    const T = scheduleS(30, 40000, 5, 0);
    expect(estimateCruiseSpeed({ runTimeS: T, lengthM: 40000, expectedStopsServed: 5, boardingsPerTrip: 0, ...kin, routeType: 2 }).cruiseSpeedMps).toBeCloseTo(30, 9);
    expect(estimateCruiseSpeed({ runTimeS: T, lengthM: 40000, expectedStopsServed: 5, boardingsPerTrip: 0, ...kin, routeType: 700 }).clamped).toBe('high');
  });
});
