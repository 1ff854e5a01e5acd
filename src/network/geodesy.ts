// Distances on the Earth for the network stage: haversine on a sphere of the mean radius, and a local
// equirectangular frame for fast point-to-segment maths over a few kilometres. Metres throughout.

/** Mean Earth radius R1 = (2a + b) / 3 of WGS84, metres. */
export const EARTH_RADIUS_M = 6371008.8;

const RAD = Math.PI / 180;

/** Great-circle distance in metres between two lat/lon points (degrees), on the sphere of EARTH_RADIUS_M. */
export function haversineM(lat1: number, lon1: number, lat2: number, lon2: number): number {
  const dLat = (lat2 - lat1) * RAD;
  const dLon = (lon2 - lon1) * RAD;
  const s = Math.sin(dLat / 2);
  const t = Math.sin(dLon / 2);
  const h = s * s + Math.cos(lat1 * RAD) * Math.cos(lat2 * RAD) * t * t;
  return 2 * EARTH_RADIUS_M * Math.asin(Math.min(1, Math.sqrt(h)));
}

/** Metres per degree of latitude on the sphere, and of longitude at a given latitude. */
export function metresPerDegree(latDeg: number): { latM: number; lonM: number } {
  const latM = EARTH_RADIUS_M * RAD;
  return { latM, lonM: latM * Math.cos(latDeg * RAD) };
}

/** A local equirectangular frame centred on (lat0, lon0): x east and y north, metres. */
export interface LocalFrame {
  x(lon: number): number;
  y(lat: number): number;
  lon(x: number): number;
  lat(y: number): number;
}

/** Builds a local frame; good to well under 0.1 % within a few kilometres of its centre. */
export function localFrame(lat0: number, lon0: number): LocalFrame {
  const { latM, lonM } = metresPerDegree(lat0);
  return {
    x: (lon) => (lon - lon0) * lonM,
    y: (lat) => (lat - lat0) * latM,
    lon: (x) => lon0 + x / lonM,
    lat: (y) => lat0 + y / latM,
  };
}

/**
 * Nearest point to P on the segment A-B, all in one planar frame (metres). Returns the fraction t along
 * the segment (0 at A, 1 at B), clamped to [tMin, 1], and the squared distance from P to that point.
 */
export function nearestOnSegment(
  px: number,
  py: number,
  ax: number,
  ay: number,
  bx: number,
  by: number,
  tMin = 0,
): { t: number; d2: number } {
  const d2 = nearestOnSegmentInto(NEAREST, px, py, ax, ay, bx, by, tMin);
  return { t: NEAREST[0], d2 };
}

const NEAREST = new Float64Array(1);

/**
 * The same without an object per call, for the loops that project stops and simplify shapes (their
 * result objects were 14 MB of garbage per Manhattan audit): returns d2 and writes t into out[0].
 */
export function nearestOnSegmentInto(
  out: Float64Array,
  px: number,
  py: number,
  ax: number,
  ay: number,
  bx: number,
  by: number,
  tMin = 0,
): number {
  const dx = bx - ax;
  const dy = by - ay;
  const len2 = dx * dx + dy * dy;
  let t = len2 > 0 ? ((px - ax) * dx + (py - ay) * dy) / len2 : 0;
  if (t < tMin) t = tMin;
  if (t > 1) t = 1;
  const qx = ax + t * dx - px;
  const qy = ay + t * dy - py;
  out[0] = t;
  return qx * qx + qy * qy;
}
