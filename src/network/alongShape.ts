// Distance along a shape of each stop of a pattern. Each stop is projected onto the shape polyline,
// searching forward from the previous stop's position within a look-ahead window a few times the
// straight-line distance between the stops, so that loops, out-and-back shapes and figure-eights never
// snap a stop backwards and the work per pattern is a small multiple of the shape's length, not stops
// times shape points. Within the window the earliest close match wins; when nothing in the window is
// close, the shape up to fallbackLookAheadM beyond is searched and a much closer point there is taken.

import { EARTH_RADIUS_M, haversineM, nearestOnSegmentInto } from './geodesy.js';

const RAD = Math.PI / 180;
const LAT_M = EARTH_RADIUS_M * RAD; // metres per degree of latitude
const T_OUT = new Float64Array(1); // the fraction along the segment, from nearestOnSegmentInto

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
  /** Minimum look-ahead window along the shape from the previous stop's position, metres. */
  minLookAheadM?: number;
  /** The window is also at least this many times the straight-line distance from the previous stop. */
  lookAheadFactor?: number;
  /** An earlier match at most this much farther from the shape than the window's best is preferred. */
  slackM?: number;
  /** When the window's best match is farther than this from the shape, the shape beyond is searched. */
  fallbackM?: number;
  /** How far beyond the window that search goes, metres (bounds the work when a shape is far from its stops). */
  fallbackLookAheadM?: number;
}

export interface AlongShapeResult {
  /** Metres along the shape from the shape's start, non-decreasing. */
  distAlongM: number[];
  /** Metres from each stop to its projected point on the shape. */
  offsetM: number[];
  /** Stops whose window held no close match, so the shape beyond the window was searched. */
  fallbacks: number;
  /** Segments examined in all (a measure of the work done). */
  segmentsVisited: number;
}

/**
 * Projects stops, in pattern order, onto a shape. Each stop's position is at or after the previous one's.
 * @example projectAlongShape(prepareShape(shape), [{ lat: 52.1, lon: 4.3 }, { lat: 52.11, lon: 4.31 }])
 */
export function projectAlongShape(shape: PreparedShape, stops: LatLon[], options: AlongShapeOptions = {}): AlongShapeResult {
  const { minLookAheadM = 300, lookAheadFactor = 2.5, slackM = 10, fallbackM = 50, fallbackLookAheadM = 3000 } = options;
  for (const [name, v] of Object.entries({ minLookAheadM, lookAheadFactor, slackM, fallbackM, fallbackLookAheadM })) {
    if (!(Number.isFinite(v) && v >= 0))
      throw new RangeError(`projectAlongShape: invalid option ${name}: expected a number >= 0, got ${v}`);
  }
  const { lat, lon, cumM, lonScaleM } = shape;
  const nSeg = lat.length - 1;
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

  // Per-segment results of the current scan, reused between stops.
  let cap = 64;
  let dBuf = new Float64Array(cap);
  let tBuf = new Float64Array(cap);

  let curSeg = 0;
  let curT = 0;
  let prevLat = lat[0];
  let prevLon = lon[0];

  /** Distances from stop s to segments from..to-1 (to exclusive) into the buffers; returns the count. */
  const scan = (s: LatLon, from: number, to: number): number => {
    const count = to - from;
    if (count > cap) {
      while (cap < count) cap *= 2;
      dBuf = new Float64Array(cap);
      tBuf = new Float64Array(cap);
    }
    for (let i = from; i < to; i++) {
      const lonM = lonScaleM[i];
      // Planar frame anchored at the segment's start point.
      const d2 = nearestOnSegmentInto(
        T_OUT,
        (s.lon - lon[i]) * lonM,
        (s.lat - lat[i]) * LAT_M,
        0,
        0,
        (lon[i + 1] - lon[i]) * lonM,
        (lat[i + 1] - lat[i]) * LAT_M,
        i === curSeg ? curT : 0,
      );
      dBuf[i - from] = Math.sqrt(d2);
      tBuf[i - from] = T_OUT[0];
    }
    segmentsVisited += count;
    return count;
  };

  /** Index (into the buffers) of the earliest valley bottom within slackM of the best, and the best. */
  const choose = (count: number): { k: number; bestD: number } => {
    let bestD = Infinity;
    for (let k = 0; k < count; k++) if (dBuf[k] < bestD) bestD = dBuf[k];
    for (let k = 0; k < count; k++) {
      const d = dBuf[k];
      if (d > bestD + slackM) continue;
      if ((k === 0 || d <= dBuf[k - 1]) && (k === count - 1 || d <= dBuf[k + 1])) return { k, bestD };
    }
    return { k: 0, bestD }; // unreachable: the best itself is a valley bottom
  };

  for (const s of stops) {
    const startPos = cumM[curSeg] + curT * (cumM[curSeg + 1] - cumM[curSeg]);
    const chordM = haversineM(prevLat, prevLon, s.lat, s.lon);
    const windowEnd = startPos + Math.max(minLookAheadM, lookAheadFactor * chordM);
    let end = curSeg + 1;
    while (end < nSeg && cumM[end] <= windowEnd) end++;

    let n = scan(s, curSeg, end);
    const { k } = choose(n);
    let seg = curSeg + k;
    let t = tBuf[k];
    let d = dBuf[k];
    // A valley cut off by the window's end: follow it down past the end.
    while (k === n - 1 && end < nSeg) {
      const prevD = d;
      scan(s, end, end + 1);
      if (!(dBuf[0] < prevD)) break;
      seg = end;
      t = tBuf[0];
      d = dBuf[0];
      end++;
    }
    if (d > fallbackM && end < nSeg) {
      // Nothing close in the window: look at the rest of the shape, and move there only for a much
      // closer point (less than half as far, and by more than the slack).
      fallbacks++;
      const from = end;
      let to = from + 1;
      const farEnd = cumM[from] + fallbackLookAheadM;
      while (to < nSeg && cumM[to] <= farEnd) to++;
      n = scan(s, from, to);
      const far = choose(n);
      if (far.bestD < d / 2 && far.bestD < d - slackM) {
        // The closest valley bottom out there, earliest among near-equals.
        seg = from + far.k;
        t = tBuf[far.k];
        d = dBuf[far.k];
      }
    }
    curSeg = seg;
    curT = t;
    prevLat = s.lat;
    prevLon = s.lon;
    distAlongM.push(cumM[seg] + t * (cumM[seg + 1] - cumM[seg]));
    offsetM.push(d);
  }
  return { distAlongM, offsetM, fallbacks, segmentsVisited };
}
