// A polygon's area on the WGS84 ellipsoid and its people spread evenly over that area. The polygon is
// drawn in a local frame at its mean latitude scaled by the ellipsoid's radii of curvature there (metres
// east = N cos(lat) dLon, metres north = M dLat), where the shoelace formula gives its area; for blocks and
// tracts a few kilometres across this agrees with the geodesic polygon area (Karney 2013) to well under
// 0.1 % (test/landuse/polygonPieces.test.ts compares with geographiclib). A small polygon (at most
// SMALL_POLYGON_M across) gives its people to one point, its area centroid; a larger one is cut by a grid of
// square cells (CELL_M, coarser when the polygon would need more than MAX_CELLS), each cell's part clipped
// exactly (Sutherland-Hodgman against the cell) and carrying people in proportion to its area, placed at
// that part's centroid. Holes (GeoJSON inner rings) take their area away.

/** WGS84 semi-major axis (m) and first eccentricity squared [C, NIMA TR8350.2]. */
const WGS84_A = 6378137;
const WGS84_E2 = 0.00669437999014;
const RAD = Math.PI / 180;

/** A polygon no wider or taller than this (metres) gives its people to its centroid alone [D]. */
export const SMALL_POLYGON_M = 100;
/** The side of the cells a larger polygon is cut into, metres [D]: a sixth of a walk's straight reach. */
export const CELL_M = 50;
/** Most cells one polygon is cut into; a larger polygon gets larger cells [D]. */
export const MAX_CELLS = 400;

/** Ring of [lon, lat] positions, closed (the first repeated last), as GeoJSON writes it. */
export type Ring = ReadonlyArray<ReadonlyArray<number>>;

/** A point a polygon's people are placed at, with its share of them (the shares sum to 1). */
export interface PolygonPiece {
  lat: number;
  lon: number;
  share: number;
}

interface Frame {
  lat0: number;
  lon0: number;
  mx: number; // metres per degree east
  my: number; // metres per degree north
}

function frameFor(rings: readonly Ring[]): Frame {
  let lat = 0;
  let lon = 0;
  let n = 0;
  for (const p of rings[0]) {
    lat += p[1];
    lon += p[0];
    n++;
  }
  const lat0 = lat / n;
  const s = Math.sin(lat0 * RAD);
  const w = 1 - WGS84_E2 * s * s;
  const N = WGS84_A / Math.sqrt(w);
  const M = (WGS84_A * (1 - WGS84_E2)) / (w * Math.sqrt(w));
  return { lat0, lon0: lon / n, mx: N * Math.cos(lat0 * RAD) * RAD, my: M * RAD };
}

function toXY(ring: Ring, f: Frame): number[] {
  const out: number[] = [];
  // the closing position repeats the first: left out, the ring is closed implicitly
  for (let i = 0; i + 1 < ring.length; i++) out.push((ring[i][0] - f.lon0) * f.mx, (ring[i][1] - f.lat0) * f.my);
  return out;
}

/** Signed area (counter-clockwise positive) and first moments of a closed ring of x, y pairs. */
function ringMoments(xy: number[]): { a: number; cx: number; cy: number } {
  let a = 0;
  let cx = 0;
  let cy = 0;
  const n = xy.length / 2;
  for (let i = 0; i < n; i++) {
    const j = (i + 1) % n;
    const x0 = xy[2 * i];
    const y0 = xy[2 * i + 1];
    const x1 = xy[2 * j];
    const y1 = xy[2 * j + 1];
    const c = x0 * y1 - x1 * y0;
    a += c;
    cx += (x0 + x1) * c;
    cy += (y0 + y1) * c;
  }
  return { a: a / 2, cx: cx / 6, cy: cy / 6 };
}

/** Area from the rings' moments (the outer ring, then holes). */
function areaOf(moments: readonly { a: number }[]): number {
  let area = Math.abs(moments[0].a);
  for (let k = 1; k < moments.length; k++) area -= Math.abs(moments[k].a);
  return Math.max(0, area);
}

/** Area in square metres of a polygon given as GeoJSON rings (the outer ring, then holes). */
export function polygonAreaM2(rings: readonly Ring[]): number {
  const f = frameFor(rings);
  return areaOf(rings.map((r) => ringMoments(toXY(r, f))));
}

/** Clips a ring (x, y pairs) to x in [x0, x1] and y in [y0, y1] (Sutherland-Hodgman, one edge at a time). */
function clipToCell(xy: number[], x0: number, y0: number, x1: number, y1: number): number[] {
  let poly = xy;
  for (let edge = 0; edge < 4 && poly.length >= 6; edge++) {
    const inside = (x: number, y: number): boolean => (edge === 0 ? x >= x0 : edge === 1 ? x <= x1 : edge === 2 ? y >= y0 : y <= y1);
    const cross = (ax: number, ay: number, bx: number, by: number): [number, number] => {
      if (edge < 2) {
        const xe = edge === 0 ? x0 : x1;
        const t = (xe - ax) / (bx - ax);
        return [xe, ay + t * (by - ay)];
      }
      const ye = edge === 2 ? y0 : y1;
      const t = (ye - ay) / (by - ay);
      return [ax + t * (bx - ax), ye];
    };
    const out: number[] = [];
    const n = poly.length / 2;
    for (let i = 0; i < n; i++) {
      const ax = poly[2 * ((i + n - 1) % n)];
      const ay = poly[2 * ((i + n - 1) % n) + 1];
      const bx = poly[2 * i];
      const by = poly[2 * i + 1];
      const ain = inside(ax, ay);
      const bin = inside(bx, by);
      if (bin) {
        if (!ain) out.push(...cross(ax, ay, bx, by));
        out.push(bx, by);
      } else if (ain) out.push(...cross(ax, ay, bx, by));
    }
    poly = out;
  }
  return poly.length >= 6 ? poly : [];
}

/**
 * Where a polygon's people are: points with shares of them that sum to 1, spread evenly over its area (see
 * the file's head). Rings are GeoJSON's: checked by the caller (closed, four positions or more, area above 0).
 */
export function polygonPieces(rings: readonly Ring[]): PolygonPiece[] {
  const f = frameFor(rings);
  const xy = rings.map((r) => toXY(r, f));
  return piecesOf(f, xy, xy.map(ringMoments));
}

/**
 * A polygon's area (polygonAreaM2) and, when it is above 0, its pieces (polygonPieces), with the frame, the
 * local coordinates and the rings' moments worked out once for both: the reader needs both of every polygon.
 */
export function polygonAreaAndPieces(rings: readonly Ring[]): { areaM2: number; pieces: PolygonPiece[] } {
  const f = frameFor(rings);
  const xy = rings.map((r) => toXY(r, f));
  const moments = xy.map(ringMoments);
  const areaM2 = areaOf(moments);
  return { areaM2, pieces: areaM2 > 0 ? piecesOf(f, xy, moments) : [] };
}

function piecesOf(f: Frame, xy: number[][], moments: readonly { a: number; cx: number; cy: number }[]): PolygonPiece[] {
  let minX = Infinity;
  let minY = Infinity;
  let maxX = -Infinity;
  let maxY = -Infinity;
  for (let i = 0; i < xy[0].length; i += 2) {
    minX = Math.min(minX, xy[0][i]);
    maxX = Math.max(maxX, xy[0][i]);
    minY = Math.min(minY, xy[0][i + 1]);
    maxY = Math.max(maxY, xy[0][i + 1]);
  }
  const back = (x: number, y: number, share: number): PolygonPiece => ({ lat: f.lat0 + y / f.my, lon: f.lon0 + x / f.mx, share });
  const w = maxX - minX;
  const h = maxY - minY;
  if (w <= SMALL_POLYGON_M && h <= SMALL_POLYGON_M) {
    let a = 0;
    let cx = 0;
    let cy = 0;
    moments.forEach((m, k) => {
      const sign = (k === 0 ? 1 : -1) * Math.sign(m.a);
      a += sign * m.a;
      cx += sign * m.cx;
      cy += sign * m.cy;
    });
    return [a !== 0 ? back(cx / a, cy / a, 1) : back((minX + maxX) / 2, (minY + maxY) / 2, 1)];
  }
  const cell = Math.max(CELL_M, Math.sqrt((w * h) / MAX_CELLS));
  const nx = Math.max(1, Math.ceil(w / cell));
  const ny = Math.max(1, Math.ceil(h / cell));
  const raw: { x: number; y: number; a: number }[] = [];
  let total = 0;
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < ny; j++) {
      const x0 = minX + i * cell;
      const y0 = minY + j * cell;
      let a = 0;
      let cx = 0;
      let cy = 0;
      xy.forEach((r, k) => {
        const part = clipToCell(r, x0, y0, x0 + cell, y0 + cell);
        if (part.length === 0) return;
        const m = ringMoments(part);
        const sign = (k === 0 ? 1 : -1) * Math.sign(m.a);
        a += sign * m.a;
        cx += sign * m.cx;
        cy += sign * m.cy;
      });
      if (a > 1e-9 * cell * cell) {
        raw.push({ x: cx / a, y: cy / a, a });
        total += a;
      }
    }
  }
  if (raw.length === 0 || !(total > 0)) return [back((minX + maxX) / 2, (minY + maxY) / 2, 1)];
  return raw.map((p) => back(p.x, p.y, p.a / total));
}
