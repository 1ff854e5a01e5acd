// The local optimum spacing where demand is uneven: s*(x) = sqrt(4 v p N(x) / (w rho(x))), N(x) the load
// on board and rho(x) the trip ends per metre, both per trip (or both per day: only their ratio matters).
// With uniform demand N = rho L / 2 and this is the square-root law.

export function localOptimalSpacingM(
  loadOnBoard: number,
  tripEndsPerM: number,
  { walkSpeedMps, lostTimePerStopS, walkWeight }: { walkSpeedMps: number; lostTimePerStopS: number; walkWeight: number },
): number | null {
  if (!(tripEndsPerM > 0) || !(loadOnBoard >= 0)) return null;
  return Math.sqrt((4 * walkSpeedMps * lostTimePerStopS * loadOnBoard) / (walkWeight * tripEndsPerM));
}
