// Simplifies a shape for maps (Douglas-Peucker in a local metric frame), so reports carry a light path
// instead of every shape point. Returns [lon, lat] pairs, as GeoJSON expects.

import { localFrame, nearestOnSegmentInto } from './geodesy.js';

const T_OUT = new Float64Array(1); // nearestOnSegmentInto's fraction, not needed here

/**
 * Keeps the points needed so that no dropped point lies farther than toleranceM from the simplified line.
 * The first and last points are always kept.
 * @example simplifyPath([52.0, 52.0005, 52.001], [4.0, 4.0, 4.0], { toleranceM: 5 }) // two points
 */
export function simplifyPath(lat: ArrayLike<number>, lon: ArrayLike<number>, options: { toleranceM?: number } = {}): [number, number][] {
  const { toleranceM = 5 } = options;
  if (!(toleranceM >= 0)) throw new RangeError(`simplifyPath: invalid option toleranceM: expected a number >= 0, got ${toleranceM}`);
  const n = lat.length;
  if (n !== lon.length) throw new RangeError(`simplifyPath: lat and lon differ in length: ${n} and ${lon.length}`);
  if (n <= 2) return Array.from({ length: n }, (_, i) => [lon[i], lat[i]] as [number, number]);
  let latSum = 0;
  for (let i = 0; i < n; i++) latSum += lat[i];
  const f = localFrame(latSum / n, lon[0]);
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = f.x(lon[i]);
    y[i] = f.y(lat[i]);
  }
  const keep = new Uint8Array(n);
  keep[0] = 1;
  keep[n - 1] = 1;
  const tol2 = toleranceM * toleranceM;
  const stack: number[] = [0, n - 1];
  while (stack.length) {
    const b = stack.pop()!;
    const a = stack.pop()!;
    let worst = -1;
    let worstD2 = tol2;
    for (let i = a + 1; i < b; i++) {
      const d2 = nearestOnSegmentInto(T_OUT, x[i], y[i], x[a], y[a], x[b], y[b]);
      if (d2 > worstD2) {
        worstD2 = d2;
        worst = i;
      }
    }
    if (worst >= 0) {
      keep[worst] = 1;
      stack.push(a, worst, worst, b);
    }
  }
  const out: [number, number][] = [];
  for (let i = 0; i < n; i++) if (keep[i]) out.push([lon[i], lat[i]]);
  return out;
}
