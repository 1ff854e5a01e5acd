// Estimates a pattern's cruise speed V so that the schedule is explained:
//   T_sched = D/V + n*(t_doors + t_reentry) + (n+1)*V*(1/(2a) + 1/(2d)) + boarding time,
// n the expected number of intermediate stops served (the +1 is accelerating from the first stop and
// braking into the last). Solved for V (the smaller root of a quadratic: the larger one would have the bus
// spend most of its time accelerating), then clamped to a plausible range for the route type.

/** Per-passenger boarding time, 2.75 s [C, Levinson 1983, TRR 915: dwell 5 s + 2.75 s per passenger]. */
export const BOARDING_TIME_PER_PAX_S = 2.75;

/** Plausible cruise speeds (m/s) by GTFS route_type, with extended types grouped by hundreds. Common practice, values from memory. */
export function cruiseSpeedRangeMps(routeType: number): { minMps: number; maxMps: number; fallbackMps: number } {
  const basic = routeType >= 100 ? extendedToBasic(routeType) : routeType;
  switch (basic) {
    case 0: return { minMps: 2, maxMps: 22, fallbackMps: 8 }; // tram
    case 1: return { minMps: 5, maxMps: 30, fallbackMps: 15 }; // subway, metro
    case 2: return { minMps: 8, maxMps: 70, fallbackMps: 25 }; // rail
    case 4: return { minMps: 2, maxMps: 20, fallbackMps: 8 }; // ferry
    case 3: case 11: return { minMps: 5, maxMps: 25, fallbackMps: 8 }; // bus, trolleybus: below about 18 km/h the schedule holds traffic delay, not cruising
    default: return { minMps: 2, maxMps: 30, fallbackMps: 8 };
  }
}

function extendedToBasic(t: number): number {
  if (t >= 100 && t < 200) return 2; // railway service
  if (t >= 400 && t < 500) return 1; // urban railway
  if (t >= 700 && t < 800) return 3; // bus service
  if (t >= 900 && t < 1000) return 0; // tram
  if (t >= 800 && t < 900) return 11; // trolleybus
  if (t >= 1000 && t < 1300) return 4; // water
  return 3;
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
  /** The unclamped solution (NaN when the schedule is too tight to be explained). */
  solvedMps: number;
  clamped: 'low' | 'high' | null;
}

export function estimateCruiseSpeed({ runTimeS, lengthM, expectedStopsServed, boardingsPerTrip, doorTimeS, reentryDelayS, accelMps2, decelMps2, routeType }: CruiseSpeedInput): CruiseSpeedEstimate {
  const range = cruiseSpeedRangeMps(routeType);
  if (!(runTimeS > 0) || !(lengthM > 0)) return { cruiseSpeedMps: range.fallbackMps, solvedMps: NaN, clamped: 'high' };
  const n = Math.max(0, expectedStopsServed);
  const k = 1 / (2 * accelMps2) + 1 / (2 * decelMps2);
  const available = runTimeS - n * (doorTimeS + reentryDelayS) - boardingsPerTrip * BOARDING_TIME_PER_PAX_S;
  const qa = (n + 1) * k;
  const disc = available * available - 4 * qa * lengthM;
  let solved = NaN;
  if (available > 0 && disc >= 0) solved = (2 * lengthM) / (available + Math.sqrt(disc)); // smaller root, stable form
  if (!Number.isFinite(solved)) return { cruiseSpeedMps: range.maxMps, solvedMps: NaN, clamped: 'high' };
  if (solved < range.minMps) return { cruiseSpeedMps: range.minMps, solvedMps: solved, clamped: 'low' };
  if (solved > range.maxMps) return { cruiseSpeedMps: range.maxMps, solvedMps: solved, clamped: 'high' };
  return { cruiseSpeedMps: solved, solvedMps: solved, clamped: null };
}
