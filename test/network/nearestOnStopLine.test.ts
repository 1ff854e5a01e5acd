// nearestOnStopLine, the one answer to "where on a pattern's line of stops does a proposed stop stand":
// a worked example in plain geometry, the edge cases, and turf's nearest point on a line as an outside
// oracle for the offset and the segment fraction.
import { describe, expect, it } from 'vitest';
import { lineString, point } from '@turf/helpers';
import { distance } from '@turf/distance';
import { nearestPointOnLine } from '@turf/nearest-point-on-line';
import { nearestOnStopLine } from '../../src/network/nearestOnStopLine.js';
import { EARTH_RADIUS_M } from '../../src/network/geodesy.js';

const M_PER_DEG = (Math.PI * EARTH_RADIUS_M) / 180; // [D] arc length of one degree on the sphere of EARTH_RADIUS_M

describe('nearestOnStopLine', () => {
  it('places a point beside a straight north-south line of stops at the interpolated distance along', () => {
    // [D] Stops at Vellmoor longitude 5.0 along a meridian, 0, 0.002 and 0.004 degrees north of 52.0. A point
    // 0.001 degrees east of the line at latitude 52.003 lies beside the second segment at t = 1/2; its offset
    // is 0.001 * M_PER_DEG * cos(52.003 deg) east, and its position along is 300 + (700 - 300) / 2 = 500.
    const lat = [52.0, 52.002, 52.004];
    const lon = [5.0, 5.0, 5.0];
    const hit = nearestOnStopLine(lat, lon, [0, 300, 700], 52.003, 5.001);
    expect(hit.posM).toBeCloseTo(500, 6);
    expect(hit.offsetM).toBeCloseTo(0.001 * M_PER_DEG * Math.cos((52.003 * Math.PI) / 180), 6);
  });

  it('clamps to the ends of the line and keeps the first of two equally near segments', () => {
    const lat = [52.0, 52.0, 52.0];
    const lon = [5.0, 5.01, 5.02];
    expect(nearestOnStopLine(lat, lon, [100, 800, 1500], 52.0, 4.99).posM).toBe(100);
    expect(nearestOnStopLine(lat, lon, [100, 800, 1500], 52.0, 5.03).posM).toBe(1500);
    // the middle stop is nearest on both segments: the first segment's end (t = 1) is returned
    expect(nearestOnStopLine(lat, lon, [100, 800, 1500], 52.001, 5.01).posM).toBe(800);
  });

  it('has no segment with fewer than two stops', () => {
    expect(nearestOnStopLine([52], [5], [40], 52, 5)).toEqual({ posM: 40, offsetM: Infinity });
    expect(nearestOnStopLine([], [], [], 52, 5)).toEqual({ posM: 0, offsetM: Infinity });
  });

  it('agrees with turf nearestPointOnLine on offset and position along for points near a winding line', () => {
    // Oracle: @turf/nearest-point-on-line (general-purpose geometry library), great-circle maths on its own
    // sphere; for points within about 100 m of a line of stops 110-400 m apart the answers agree closely.
    let seed = 7;
    const rnd = () => ((seed = (seed * 16807) % 2147483647) - 1) / 2147483646;
    for (let trial = 0; trial < 40; trial++) {
      const lat: number[] = [52.37];
      const lon: number[] = [4.89];
      const posM: number[] = [0];
      for (let i = 1; i < 8; i++) {
        // a line that keeps heading north-east and winds from side to side, so one segment is clearly nearest
        lat.push(lat[i - 1] + (0.5 + rnd()) * 0.002);
        lon.push(lon[i - 1] + (rnd() - 0.3) * 0.004);
        posM.push(posM[i - 1] + distance([lon[i - 1], lat[i - 1]], [lon[i], lat[i]], { units: 'meters' }));
      }
      const k = 1 + Math.floor(rnd() * 5);
      const pLat = (lat[k] + lat[k + 1]) / 2 + (rnd() - 0.5) * 0.001;
      const pLon = (lon[k] + lon[k + 1]) / 2 + (rnd() - 0.5) * 0.002;
      const ours = nearestOnStopLine(lat, lon, posM, pLat, pLon);
      const coords = lat.map((la, i) => [lon[i], la]);
      const theirs = nearestPointOnLine(lineString(coords), point([pLon, pLat]), { units: 'meters' });
      const along = theirs.properties.lineDistance; // posM is the same running sum of turf's distances
      expect(Math.abs(ours.offsetM - theirs.properties.pointDistance)).toBeLessThan(0.005 * theirs.properties.pointDistance + 0.05);
      expect(Math.abs(ours.posM - along)).toBeLessThan(0.5);
    }
  });
});
