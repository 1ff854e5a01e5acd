// simplifyPath (Douglas-Peucker in metres): the kept points stay within the tolerance of every dropped
// point, ends are kept, and straight runs collapse.

import { describe, it, expect } from 'vitest';
import { lineString } from '@turf/helpers';
import { pointToLineDistance } from '@turf/point-to-line-distance';
import fc from 'fast-check';
import { simplifyPath } from '../../src/network/simplifyPath.js';
import { at } from '../helpers/handFeed.js';

function path(xy: [number, number][]) {
  const pts = xy.map(([x, y]) => at(x, y));
  return { lat: pts.map((p) => p.lat), lon: pts.map((p) => p.lon) };
}

describe('simplifyPath', () => {
  it('collapses a straight run to its two ends, as [lon, lat] pairs', () => {
    const p = path(Array.from({ length: 50 }, (_, i) => [i * 20, 0] as [number, number]));
    expect(simplifyPath(p.lat, p.lon)).toEqual([
      [p.lon[0], p.lat[0]],
      [p.lon[49], p.lat[49]],
    ]);
  });

  it('keeps a corner and drops a 2 m wobble at a 5 m tolerance', () => {
    const p = path([
      [0, 0],
      [100, 2],
      [200, 0],
      [200, 200],
    ]);
    expect(simplifyPath(p.lat, p.lon, { toleranceM: 5 })).toHaveLength(3);
    expect(simplifyPath(p.lat, p.lon, { toleranceM: 1 })).toHaveLength(4);
  });

  it('leaves every dropped point within the tolerance of the simplified line (turf as the judge)', () => {
    // Reference: @turf/point-to-line-distance (metres on its sphere), on random wiggly paths.
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: -30, max: 30 }), fc.integer({ min: 5, max: 60 })), { minLength: 3, maxLength: 40 }),
        (steps) => {
          let x = 0;
          const xy: [number, number][] = [[0, 0]];
          for (const [dy, dx] of steps) xy.push([(x += dx), dy]);
          const p = path(xy);
          const out = simplifyPath(p.lat, p.lon, { toleranceM: 5 });
          expect(out[0]).toEqual([p.lon[0], p.lat[0]]);
          expect(out[out.length - 1]).toEqual([p.lon[xy.length - 1], p.lat[xy.length - 1]]);
          const simple = lineString(out);
          for (let i = 0; i < xy.length; i++) {
            expect(pointToLineDistance([p.lon[i], p.lat[i]], simple, { units: 'meters' })).toBeLessThan(5.05);
          }
        },
      ),
      { numRuns: 60, seed: 7 },
    );
  });

  it('returns short paths as they are and rejects a bad tolerance', () => {
    const p = path([
      [0, 0],
      [10, 0],
    ]);
    expect(simplifyPath(p.lat, p.lon)).toHaveLength(2);
    expect(() => simplifyPath(p.lat, p.lon, { toleranceM: -1 })).toThrow(/toleranceM/);
  });
});
