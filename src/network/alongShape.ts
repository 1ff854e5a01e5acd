// Distance along a shape of each stop of a pattern. Each stop is projected onto the shape polyline,
// searching forward from the previous stop's position, so that loops, out-and-back shapes and figure-eights
// never snap a stop backwards. The search stops a little past the first close match, so the work per
// pattern is about the shape's length, not stops times shape points.

import { EARTH_RADIUS_M, haversineM, nearestOnSegment } from './geodesy.js';

const RAD = Math.PI / 180;
const LAT_M = EARTH_RADIUS_M * RAD; // metres per degree of latitude

export interface LatLon {
  lat: number;
  lon: number;
}

/** A shape ready for projection: its points and the cumulative great-circle length at each point. */
export interface PreparedShape {
  lat: ArrayLike<number>;
  lon: ArrayLike<number>;
  /** cumM[i] = metres along the shape from point 0 to point i. */
  cumM: Float64Array;
  /** Metres per degree of longitude at each point. */
  lonScaleM: Float64Array;
  lengthM: number;
}

/** Computes the cumulative length of a shape (haversine per segment). Needs at least one point. */
export function prepareShape(shape: { lat: ArrayLike<number>; lon: ArrayLike<number> }): PreparedShape {
  const n = shape.lat.length;
  if (n < 1 || shape.lon.length !== n) {
    throw new RangeError(`prepareShape: shape needs matching lat/lon arrays with at least one point, got ${n} and ${shape.lon.length}`);
  }
  const cumM = new Float64Array(n);
  const lonScaleM = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    lonScaleM[i] = LAT_M * Math.cos(shape.lat[i] * RAD);
    if (i > 0) cumM[i] = cumM[i - 1] + haversineM(shape.lat[i - 1], shape.lon[i - 1], shape.lat[i], shape.lon[i]);
  }
  return { lat: shape.lat, lon: shape.lon, cumM, lonScaleM, lengthM: cumM[n - 1] };
}

export interface AlongShapeOptions {
  /** A match at most this far from the shape ends the search once the shape has moved settleM past it. */
  snapM?: number;
  /** How far along the shape past a close match to keep looking for a closer point. */
  settleM?: number;
  /** Minimum look-ahead window along the shape from the previous stop's position. */
  minLookAheadM?: number;
  /** The window is also at least this many times the straight-line distance from the previous stop. */
  lookAheadFactor?: number;
  /** When the best match in the window is farther than this from the shape, search the rest of the shape. */
  fallbackM?: number;
  /** A far-away point (beyond settleM from the current best) must be closer by this much to win. */
  tieM?: number;
}

export interface AlongShapeResult {
  /** Metres along the shape from the shape's start, non-decreasing. */
  distAlongM: number[];
  /** Metres from each stop to its projected point on the shape. */
  offsetM: number[];
  /** Stops whose window held no close match, so the rest of the shape was searched. */
  fallbacks: number;
  /** Segments examined in all (a measure of the work done). */
  segmentsVisited: number;
}

/**
 * Projects stops, in pattern order, onto a shape. Each stop's position is at or after the previous one's.
 * @example projectAlongShape(prepareShape(shape), [{ lat: 52.1, lon: 4.3 }, { lat: 52.11, lon: 4.31 }])
 */
export function projectAlongShape(shape: PreparedShape, stops: LatLon[], options: AlongShapeOptions = {}): AlongShapeResult {
  const {
    snapM = 30,
    settleM = 100,
    minLookAheadM = 1000,
    lookAheadFactor = 3,
    fallbackM = 150,
    tieM = 0.5,
  } = options;
  for (const [name, v] of Object.entries({ snapM, settleM, minLookAheadM, lookAheadFactor, fallbackM, tieM })) {
    if (!(Number.isFinite(v) && v >= 0)) throw new RangeError(`projectAlongShape: invalid option ${name}: expected a number >= 0, got ${v}`);
  }
  const { lat, lon, cumM, lonScaleM } = shape;
  const nPts = lat.length;
  const nSeg = nPts - 1;
  const distAlongM: number[] = [];
  const offsetM: number[] = [];
  let fallbacks = 0;
  let segmentsVisited = 0;

  if (nSeg < 1) {
    // A one-point shape: every stop sits at distance 0, offset to that point.
    for (const s of stops) {
      distAlongM.push(0);
      offsetM.push(haversineM(s.lat, s.lon, lat[0], lon[0]));
    }
    return { distAlongM, offsetM, fallbacks, segmentsVisited };
  }

  let curSeg = 0;
  let curT = 0;
  let prevLat = lat[0];
  let prevLon = lon[0];
  const snap2 = snapM * snapM;

  for (const s of stops) {
    const startPos = cumM[curSeg] + curT * (cumM[curSeg + 1] - cumM[curSeg]);
    const chordM = haversineM(prevLat, prevLon, s.lat, s.lon);
    const windowEnd = startPos + Math.max(minLookAheadM, lookAheadFactor * chordM);
    let bestD = Infinity;
    let bestSeg = curSeg;
    let bestT = curT;
    let bestPos = startPos;

    const scan = (from: number, to: number, stopAtWindow: boolean): number => {
      let i = from;
      for (; i < to; i++) {
        if (stopAtWindow && cumM[i] > windowEnd && bestD < Infinity) break;
        if (bestD * bestD <= snap2 && cumM[i] > bestPos + settleM) break;
        const lonM = lonScaleM[i];
        // Planar frame anchored at the segment's start point.
        const bx = (lon[i + 1] - lon[i]) * lonM;
        const by = (lat[i + 1] - lat[i]) * LAT_M;
        const px = (s.lon - lon[i]) * lonM;
        const py = (s.lat - lat[i]) * LAT_M;
        const tMin = i === curSeg ? curT : 0;
        const r = nearestOnSegment(px, py, 0, 0, bx, by, tMin);
        segmentsVisited++;
        const d = Math.sqrt(r.d2);
        const pos = cumM[i] + r.t * (cumM[i + 1] - cumM[i]);
        const near = pos - bestPos <= settleM;
        if (d < bestD - (near ? 0 : tieM)) {
          bestD = d;
          bestSeg = i;
          bestT = r.t;
          bestPos = pos;
        }
      }
      return i;
    };

    const reached = scan(curSeg, nSeg, true);
    if (bestD > fallbackM && reached < nSeg) {
      fallbacks++;
      scan(reached, nSeg, false);
    }
    curSeg = bestSeg;
    curT = bestT;
    prevLat = s.lat;
    prevLon = s.lon;
    distAlongM.push(bestPos);
    offsetM.push(bestD);
  }
  return { distAlongM, offsetM, fallbacks, segmentsVisited };
}
