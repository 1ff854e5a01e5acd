// Estimates a pattern's cruise speed V, the speed a vehicle reaches between stops, from its schedule:
//   T_sched = D/V + n*(t_doors + t_reentry) + (n+1)*V*(1/(2a) + 1/(2d)) + boarding time + traffic delay,
// n the expected number of intermediate stops served (the +1 is accelerating from the first stop and
// braking into the last). One schedule cannot tell cruise speed from traffic delay (signals, congestion):
// solving the equation with no traffic delay gives the slowest cruise that still keeps to the schedule
// (the smaller root of a quadratic: the larger one would have the bus spend most of its time
// accelerating). V is that speed or the route type's typical cruise speed, whichever is higher; when the
// typical speed is used, the rest of the run time is reported as traffic delay. Folding a congested
// schedule into a slow cruise instead would shrink the braking-and-accelerating loss, and so the optimal
// spacing, exactly where traffic is worst. A schedule faster than any plausible V explains (no root, or a
// root above the route type's highest plausible speed) is implausible: V is then the typical speed, never
// the highest, since the highest would make the loss per stop as large as possible where the schedule
// says the bus loses little.

import { speedFamily } from '../gtfs/routeTypes.js';

const MPH25 = 25 * 0.44704; // 11.176 m/s

/** Per-passenger boarding time, 2.75 s [C, Levinson 1983, TRR 915: dwell 5 s + 2.75 s per passenger]. */
export const BOARDING_TIME_PER_PAX_S = 2.75;

/**
 * Typical and highest plausible cruise speeds (m/s) by the family of the GTFS route_type. Common practice,
 * values from memory; the bus figure is 25 mph, a usual urban street limit and the speed of the HCM 2010
 * transit delay example.
 */
export function cruiseSpeedBoundsMps(routeType: number): { typicalMps: number; maxMps: number } {
  switch (speedFamily(routeType)) {
    case 'bus':
      return { typicalMps: MPH25, maxMps: 25 }; // bus, trolleybus, coach
    case 'tram':
      return { typicalMps: MPH25, maxMps: 22 }; // on street
    case 'metro':
      return { typicalMps: 15, maxMps: 30 };
    case 'rail':
      return { typicalMps: 25, maxMps: 70 };
    case 'ferry':
      return { typicalMps: 8, maxMps: 20 };
    default:
      return { typicalMps: 8, maxMps: 30 }; // cable cars, funiculars, other
  }
}

export interface CruiseSpeedInput {
  runTimeS: number; // first departure to last arrival
  lengthM: number;
  expectedStopsServed: number; // intermediate stops, sum of stopping probabilities
  boardingsPerTrip: number;
  doorTimeS: number;
  reentryDelayS: number;
  accelMps2: number;
  decelMps2: number;
  routeType: number;
}

export interface CruiseSpeedEstimate {
  cruiseSpeedMps: number;
  /** The slowest cruise that keeps to the schedule with no traffic delay (NaN when the schedule is too tight to be explained). */
  solvedMps: number;
  /** schedule: V from the schedule; typical: the route type's typical speed, the schedule being slower; implausible: the schedule is faster than any plausible V explains, so the typical speed is used. */
  basis: 'schedule' | 'typical' | 'implausible';
  /** Run time per trip not explained by driving at V, the stops served and boarding: signals and congestion (s, >= 0). */
  trafficDelayS: number;
}

export function estimateCruiseSpeed({
  runTimeS,
  lengthM,
  expectedStopsServed,
  boardingsPerTrip,
  doorTimeS,
  reentryDelayS,
  accelMps2,
  decelMps2,
  routeType,
}: CruiseSpeedInput): CruiseSpeedEstimate {
  const { typicalMps, maxMps } = cruiseSpeedBoundsMps(routeType);
  if (!(runTimeS > 0) || !(lengthM > 0)) return { cruiseSpeedMps: typicalMps, solvedMps: NaN, basis: 'typical', trafficDelayS: 0 };
  const n = Math.max(0, expectedStopsServed);
  const k = 1 / (2 * accelMps2) + 1 / (2 * decelMps2);
  const fixed = n * (doorTimeS + reentryDelayS) + boardingsPerTrip * BOARDING_TIME_PER_PAX_S;
  const available = runTimeS - fixed;
  const qa = (n + 1) * k;
  const disc = available * available - 4 * qa * lengthM;
  let solved = NaN;
  if (available > 0 && disc >= 0) solved = (2 * lengthM) / (available + Math.sqrt(disc)); // smaller root, stable form
  if (!Number.isFinite(solved) || solved > maxMps)
    return { cruiseSpeedMps: typicalMps, solvedMps: solved, basis: 'implausible', trafficDelayS: 0 };
  if (solved >= typicalMps) return { cruiseSpeedMps: solved, solvedMps: solved, basis: 'schedule', trafficDelayS: 0 };
  const explained = lengthM / typicalMps + fixed + qa * typicalMps;
  return { cruiseSpeedMps: typicalMps, solvedMps: solved, basis: 'typical', trafficDelayS: Math.max(0, runTimeS - explained) };
}
