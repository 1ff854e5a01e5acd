// Polygon areas and the shares of people spread over them, checked against the geodesic polygon area of
// geographiclib (Karney, "Algorithms for geodesics", J. Geodesy 87, 2013; the geographiclib-geodesic package)
// [C for the reference method]: within 0.5 %, the tolerance the project holds its distances to.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import geodesicPkg from 'geographiclib-geodesic';
import { CELL_M, polygonAreaAndPieces, polygonAreaM2, polygonPieces, SMALL_POLYGON_M, type Ring } from '../../src/landuse/polygonPieces.js';
import { readLandUse } from '../../src/landuse/readLandUse.js';

const WGS84 = geodesicPkg.Geodesic.WGS84;

/** geographiclib's area of a ring of [lon, lat] positions (closed), square metres. */
function karneyArea(ring: Ring): number {
  const p = WGS84.Polygon(false);
  for (const q of ring.slice(0, -1)) p.AddPoint(q[1], q[0]);
  return Math.abs(p.Compute(false, true).area as number);
}

const close = (ring: number[][]): number[][] => [...ring, ring[0]];
const rel = (a: number, b: number) => Math.abs(a - b) / b;

// invented Vellmoor blocks and tracts at three latitudes (the ellipsoid's curvature differs most between them)
const SHAPES: Record<string, number[][]> = {
  'city block at 52 N': close([
    [4.9, 52.0],
    [4.9013, 52.0],
    [4.9013, 52.0009],
    [4.9, 52.0009],
  ]),
  'irregular tract at 45 N': close([
    [10.0, 45.0],
    [10.031, 45.004],
    [10.024, 45.027],
    [10.006, 45.031],
    [9.994, 45.012],
  ]),
  'L-shaped estate near the equator': close([
    [-78.5, -0.2],
    [-78.48, -0.2],
    [-78.48, -0.19],
    [-78.49, -0.19],
    [-78.49, -0.17],
    [-78.5, -0.17],
  ]),
  'clockwise ring at 60 N': close([
    [24.9, 60.1],
    [24.9, 60.12],
    [24.95, 60.12],
    [24.95, 60.1],
  ]),
};

describe('polygon areas', () => {
  for (const [name, ring] of Object.entries(SHAPES)) {
    it(`agree with geographiclib within 0.5 %: ${name}`, () => {
      expect(rel(polygonAreaM2([ring]), karneyArea(ring))).toBeLessThan(0.005);
    });
  }

  it('take a hole away', () => {
    const outer = SHAPES['irregular tract at 45 N'];
    const hole = close([
      [10.01, 45.01],
      [10.01, 45.015],
      [10.02, 45.015],
      [10.02, 45.01],
    ]);
    expect(rel(polygonAreaM2([outer, hole]), karneyArea(outer) - karneyArea(hole))).toBeLessThan(0.005);
  });
});

describe('people spread over a polygon', () => {
  it('a small block gives its people to one point inside it', () => {
    const ring = close([
      [4.9, 52.0],
      [4.9008, 52.0],
      [4.9008, 52.0006],
      [4.9, 52.0006],
    ]); // about 55 x 67 m
    const pieces = polygonPieces([ring]);
    expect(pieces).toHaveLength(1);
    expect(pieces[0].share).toBe(1);
    expect(pieces[0].lon).toBeCloseTo(4.9004, 6);
    expect(pieces[0].lat).toBeCloseTo(52.0003, 6);
    expect(SMALL_POLYGON_M).toBeGreaterThan(67);
  });

  it("a larger one spreads them by area: the share west of a meridian is that part's geodesic area over the whole", () => {
    // a trapezoid about 1 km wide and 0.8 km tall (so its cells are CELL_M) whose north edge slopes, cut along the meridian that falls on a cell
    // boundary 10 cells east of its west edge; metres per degree of longitude at the ring's mean latitude
    // from geographiclib [D: a 0.001 degree east-west geodesic is the parallel's arc to well under 1e-6]
    const ring = close([
      [10.0, 45.0],
      [10.0127, 45.0],
      [10.0127, 45.004],
      [10.0, 45.007],
    ]);
    const lat0 = ring.slice(0, -1).reduce((s, q) => s + q[1], 0) / 4;
    const mPerDegLon = (WGS84.Inverse(lat0, 10, lat0, 10.001).s12 as number) / 0.001;
    const cut = 10.0 + (10 * CELL_M) / mPerDegLon;
    const west = close([
      [10.0, 45.0],
      [cut, 45.0],
      [cut, 45.007 - ((cut - 10.0) / 0.0127) * 0.003],
      [10.0, 45.007],
    ]);
    const pieces = polygonPieces([ring]);
    expect(pieces.length).toBeGreaterThan(100);
    expect(pieces.reduce((s, p) => s + p.share, 0)).toBeCloseTo(1, 12);
    const westShare = pieces.filter((p) => p.lon < cut).reduce((s, p) => s + p.share, 0);
    expect(rel(westShare, karneyArea(west) / karneyArea(ring))).toBeLessThan(0.005);
  });

  const tmp = mkdtempSync(join(tmpdir(), 'stopspan-polygons-'));
  afterAll(() => rmSync(tmp, { recursive: true, force: true }));

  it("a MultiPolygon's people split over its parts by their geodesic areas", () => {
    const a = SHAPES['city block at 52 N'];
    const b = close([
      [4.92, 52.0],
      [4.9245, 52.0],
      [4.9245, 52.002],
      [4.92, 52.002],
    ]);
    const file = join(tmp, 'estate.geojson');
    writeFileSync(
      file,
      JSON.stringify({
        type: 'FeatureCollection',
        features: [
          { type: 'Feature', properties: { population: 1000, jobs: 300 }, geometry: { type: 'MultiPolygon', coordinates: [[a], [b]] } },
        ],
      }),
    );
    const layer = readLandUse(file);
    expect(layer.totals[0]).toBeCloseTo(1000, 9);
    expect(layer.totals[1]).toBeCloseTo(300, 9);
    let inA = 0;
    for (let i = 0; i < layer.lat.length; i++) if (layer.lon[i] < 4.91) inA += layer.amounts[0][i];
    expect(rel(inA / 1000, karneyArea(a) / (karneyArea(a) + karneyArea(b)))).toBeLessThan(0.005);
  });

  it("the reader's one-pass area and pieces are exactly the area and the pieces worked out apart", () => {
    const hole = close([
      [10.01, 45.01],
      [10.01, 45.015],
      [10.02, 45.015],
      [10.02, 45.01],
    ]);
    const cases: Ring[][] = [...Object.values(SHAPES).map((r) => [r]), [SHAPES['irregular tract at 45 N'], hole]];
    for (const rings of cases) {
      const both = polygonAreaAndPieces(rings);
      expect(both.areaM2).toBe(polygonAreaM2(rings));
      expect(both.pieces).toEqual(polygonPieces(rings));
    }
    // a ring enclosing no area has no pieces
    expect(
      polygonAreaAndPieces([
        close([
          [4.9, 52.0],
          [4.91, 52.0],
          [4.92, 52.0],
        ]),
      ]),
    ).toEqual({ areaM2: 0, pieces: [] });
  });

  it('reads a GeoJSON file with a byte-order mark and names that are not ASCII as UTF-8', () => {
    const file = join(tmp, 'bom.geojson');
    const doc = {
      type: 'FeatureCollection',
      features: [
        { type: 'Feature', properties: { name: 'Ölmarkt – Süd', population: 12 }, geometry: { type: 'Point', coordinates: [4.9, 52.0] } },
      ],
    };
    writeFileSync(file, '\uFEFF' + JSON.stringify(doc));
    const layer = readLandUse(file);
    expect(layer.totalPeople).toBe(12);
    expect(layer.lat[0]).toBe(52.0);
  });
});
