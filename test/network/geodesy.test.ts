// Haversine and the local frame, checked against geographiclib (Karney's geodesics on WGS84).

import { describe, it, expect } from 'vitest';
import geodesic from 'geographiclib-geodesic';
import { EARTH_RADIUS_M, haversineM, localFrame, nearestOnSegment } from '../../src/network/geodesy.js';

const wgs84 = geodesic.Geodesic.WGS84;
const karneyM = (a: [number, number], b: [number, number]) => wgs84.Inverse(a[0], a[1], b[0], b[1]).s12!;

describe('haversineM', () => {
  // [C] Reference library: geographiclib-geodesic, Karney's geodesics on the WGS84 ellipsoid (the paper,
  // "Algorithms for geodesics", J. Geodesy 2013, cited from memory [M]). The sphere must agree within
  // 0.5 % (design section 3).
  const pairs: [string, [number, number], [number, number]][] = [
    ['a 200 m east-west gap at 52 N', [52.0, 4.9], [52.0, 4.902922]],
    ['a 200 m north-south gap at 52 N', [52.0, 4.9], [52.0018, 4.9]],
    ['a diagonal 3 km gap at 40.7 N', [40.75, -73.99], [40.77, -73.97]],
    ['a 10 km gap near the equator', [0.0, 10.0], [0.05, 10.07]],
    ['a 1000 km gap at high latitude', [60.0, 5.0], [64.0, 20.0]],
    ['a 5 m gap', [52.0, 4.9], [52.000045, 4.9]],
  ];
  for (const [name, a, b] of pairs) {
    it(`agrees with geographiclib within 0.5 % for ${name}`, () => {
      const ref = karneyM(a, b);
      const got = haversineM(a[0], a[1], b[0], b[1]);
      expect(Math.abs(got - ref) / ref).toBeLessThan(0.005);
    });
  }

  it('uses the mean radius of WGS84, 6 371 008.8 m', () => {
    // [C] IUGG mean radius R1 = (2a + b)/3 with a = 6 378 137 m, b = 6 356 752.3142 m (WGS84 defining values).
    expect(EARTH_RADIUS_M).toBeCloseTo((2 * 6378137 + 6356752.3142) / 3, 0);
    // A quarter meridian on the sphere is pi R / 2 [D].
    expect(haversineM(0, 0, 90, 0)).toBeCloseTo((Math.PI * EARTH_RADIUS_M) / 2, 3);
  });

  it('is zero for the same point and symmetric', () => {
    expect(haversineM(52, 4.9, 52, 4.9)).toBe(0);
    expect(haversineM(52, 4.9, 52.01, 4.95)).toBeCloseTo(haversineM(52.01, 4.95, 52, 4.9), 9);
  });
});

describe('localFrame', () => {
  it('gives planar distances within 0.1 % of geographiclib over a few kilometres', () => {
    const f = localFrame(40.76, -73.98);
    const a: [number, number] = [40.75, -73.99];
    const b: [number, number] = [40.77, -73.96];
    const planar = Math.hypot(f.x(b[1]) - f.x(a[1]), f.y(b[0]) - f.y(a[0]));
    const ref = karneyM(a, b); // geographiclib, WGS84
    expect(Math.abs(planar - ref) / ref).toBeLessThan(0.005);
    expect(Math.abs(planar - haversineM(a[0], a[1], b[0], b[1])) / ref).toBeLessThan(0.001);
  });

  it('round-trips coordinates', () => {
    const f = localFrame(52, 4.9);
    expect(f.lat(f.y(52.01))).toBeCloseTo(52.01, 12);
    expect(f.lon(f.x(4.93))).toBeCloseTo(4.93, 12);
  });
});

describe('nearestOnSegment', () => {
  it('drops a perpendicular inside the segment', () => {
    const r = nearestOnSegment(3, 4, 0, 0, 10, 0);
    expect(r.t).toBeCloseTo(0.3, 12);
    expect(r.d2).toBeCloseTo(16, 12);
  });
  it('clamps to the ends and to tMin', () => {
    expect(nearestOnSegment(-5, 0, 0, 0, 10, 0).t).toBe(0);
    expect(nearestOnSegment(15, 0, 0, 0, 10, 0)).toEqual({ t: 1, d2: 25 });
    expect(nearestOnSegment(2, 0, 0, 0, 10, 0, 0.5)).toEqual({ t: 0.5, d2: 9 });
  });
  it('handles a zero-length segment', () => {
    expect(nearestOnSegment(3, 4, 1, 1, 1, 1)).toEqual({ t: 0, d2: 13 });
  });
});
