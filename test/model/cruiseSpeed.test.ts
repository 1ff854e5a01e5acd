// The cruise speed behind a schedule: round trips against schedules built from a known speed, with and
// without traffic delay on top.
import { describe, expect, it } from 'vitest';
import { BOARDING_TIME_PER_PAX_S, cruiseSpeedBoundsMps, estimateCruiseSpeed } from '../../src/model/cruiseSpeed.js';
import { lostTimePerStopS } from '../../src/model/lostTime.js';

const kin = { doorTimeS: 3, reentryDelayS: 2, accelMps2: 1.22, decelMps2: 1.22 };

function scheduleS(V: number, D: number, n: number, boardings: number, trafficDelayS = 0): number {
  // T = D/V + n(t_doors + t_reentry) + (n+1) V (1/2a + 1/2d) + boardings * 2.75 s + traffic delay
  // [C] 2.75 s per boarding: Levinson 1983 (TRR 915), via design notes
  return (
    D / V +
    n * (kin.doorTimeS + kin.reentryDelayS) +
    (n + 1) * V * (1 / (2 * kin.accelMps2) + 1 / (2 * kin.decelMps2)) +
    boardings * 2.75 +
    trafficDelayS
  );
}

describe('estimateCruiseSpeed', () => {
  it('recovers the speed a schedule was built from when it is above the typical speed', () => {
    expect(BOARDING_TIME_PER_PAX_S).toBe(2.75);
    for (const V of [12, 15, 17]) {
      const T = scheduleS(V, 8000, 30, 40);
      const est = estimateCruiseSpeed({ runTimeS: T, lengthM: 8000, expectedStopsServed: 30, boardingsPerTrip: 40, ...kin, routeType: 3 });
      expect(est.cruiseSpeedMps).toBeCloseTo(V, 9);
      expect(est.basis).toBe('schedule');
      expect(est.trafficDelayS).toBe(0);
    }
  });

  it('takes a slow schedule as traffic delay at the typical speed, not as slow cruising', () => {
    // a schedule built at the typical bus speed with 900 s of signal and congestion delay on top
    const typical = cruiseSpeedBoundsMps(3).typicalMps;
    expect(typical).toBeCloseTo(11.176, 3); // 25 mph = 11.176 m/s (1 mph = 0.44704 m/s exactly, NIST SP 811); the speed itself common practice, from memory
    const T = scheduleS(typical, 8000, 30, 40, 900);
    const est = estimateCruiseSpeed({ runTimeS: T, lengthM: 8000, expectedStopsServed: 30, boardingsPerTrip: 40, ...kin, routeType: 3 });
    expect(est.basis).toBe('typical');
    expect(est.cruiseSpeedMps).toBe(typical);
    expect(est.trafficDelayS).toBeCloseTo(900, 6);
    // the solved speed is the slowest cruise keeping to the schedule with no delay: it really does
    expect(est.solvedMps).toBeLessThan(typical);
    expect(scheduleS(est.solvedMps, 8000, 30, 40)).toBeCloseTo(T, 6);
  });

  it('keeps the lost time per stop at the typical speed however congested the schedule', () => {
    // HCM 2010 transit delay expression: 9.17 s of braking and accelerating at 25 mph with 4.0 ft/s2 [S, via design notes]
    const slow = estimateCruiseSpeed({
      runTimeS: 6000,
      lengthM: 8000,
      expectedStopsServed: 30,
      boardingsPerTrip: 40,
      ...kin,
      routeType: 3,
    });
    const slower = estimateCruiseSpeed({
      runTimeS: 9000,
      lengthM: 8000,
      expectedStopsServed: 30,
      boardingsPerTrip: 40,
      ...kin,
      routeType: 3,
    });
    expect(slow.cruiseSpeedMps).toBe(slower.cruiseSpeedMps);
    expect(slower.trafficDelayS - slow.trafficDelayS).toBeCloseTo(3000, 6);
    expect(lostTimePerStopS(slow.cruiseSpeedMps, { doorTimeS: 0, reentryDelayS: 0, accelMps2: 1.22, decelMps2: 1.22 })).toBeCloseTo(
      9.17,
      1,
    );
  });

  it('takes the typical speed, never the highest, for a schedule faster than any plausible speed explains', () => {
    const { typicalMps, maxMps } = cruiseSpeedBoundsMps(3);
    // no root at all: too little time even to drive the length
    const none = estimateCruiseSpeed({ runTimeS: 100, lengthM: 8000, expectedStopsServed: 30, boardingsPerTrip: 40, ...kin, routeType: 3 });
    expect(none.basis).toBe('implausible');
    expect(Number.isNaN(none.solvedMps)).toBe(true);
    expect(none.cruiseSpeedMps).toBe(typicalMps);
    expect(none.trafficDelayS).toBe(0);
    // a root, but above the highest plausible bus speed (a schedule built for 27 m/s)
    const T = scheduleS(27, 8000, 10, 0);
    const fast = estimateCruiseSpeed({ runTimeS: T, lengthM: 8000, expectedStopsServed: 10, boardingsPerTrip: 0, ...kin, routeType: 3 });
    expect(fast.solvedMps).toBeCloseTo(27, 6);
    expect(fast.basis).toBe('implausible');
    expect(fast.cruiseSpeedMps).toBe(typicalMps);
    expect(fast.cruiseSpeedMps).toBeLessThan(maxMps);
  });

  it('uses the bounds of the route type, extended types included', () => {
    const T = scheduleS(30, 40000, 5, 0);
    expect(
      estimateCruiseSpeed({ runTimeS: T, lengthM: 40000, expectedStopsServed: 5, boardingsPerTrip: 0, ...kin, routeType: 2 })
        .cruiseSpeedMps,
    ).toBeCloseTo(30, 9);
    expect(
      estimateCruiseSpeed({ runTimeS: T, lengthM: 40000, expectedStopsServed: 5, boardingsPerTrip: 0, ...kin, routeType: 700 }).basis,
    ).toBe('implausible');
    expect(cruiseSpeedBoundsMps(704)).toEqual(cruiseSpeedBoundsMps(3));
  });
});
