// The point of a pattern's line of stops (the polyline through its stops, in order) nearest to a given
// point, as a distance along the pattern: where a proposed stop at that point would stand. One answer for
// the what-if engine, which weighs the stop there, and the what-if page, which draws it there. Each
// segment is measured in an equirectangular frame centred on the point (good to well under 0.1 % within
// the few hundred metres a proposal may lie from its route); the position along interpolates the stops'
// own distances along, so it agrees with the pattern's measure of every stop.

import { EARTH_RADIUS_M } from './geodesy.js';

export interface StopLinePoint {
  /** Metres along the pattern of the nearest point of the line of stops. */
  posM: number;
  /** Metres from the given point to that nearest point (Infinity when the line has no segment). */
  offsetM: number;
}

/**
 * Nearest point to (lat, lon) on the polyline through stops 0..n-1 (stopLat/stopLon in degrees), whose
 * distances along the pattern are posM. The first nearest segment wins a tie. With fewer than two stops
 * there is no segment: posM is the first stop's (0 without one) and offsetM Infinity.
 */
export function nearestOnStopLine(
  stopLat: ArrayLike<number>,
  stopLon: ArrayLike<number>,
  posM: ArrayLike<number>,
  lat: number,
  lon: number,
): StopLinePoint {
  const k = Math.cos((lat * Math.PI) / 180);
  const x = (lo: number) => ((lo - lon) * Math.PI * EARTH_RADIUS_M * k) / 180;
  const y = (la: number) => ((la - lat) * Math.PI * EARTH_RADIUS_M) / 180;
  let best: StopLinePoint = { posM: posM.length > 0 ? posM[0] : 0, offsetM: Infinity };
  for (let m = 0; m + 1 < posM.length; m++) {
    const ax = x(stopLon[m]);
    const ay = y(stopLat[m]);
    const dx = x(stopLon[m + 1]) - ax;
    const dy = y(stopLat[m + 1]) - ay;
    const len2 = dx * dx + dy * dy;
    const t = len2 > 0 ? Math.min(1, Math.max(0, -(ax * dx + ay * dy) / len2)) : 0;
    const d = Math.hypot(ax + t * dx, ay + t * dy);
    if (d < best.offsetM) best = { posM: posM[m] + t * (posM[m + 1] - posM[m]), offsetM: d };
  }
  return best;
}
