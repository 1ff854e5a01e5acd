// The unit of shape_dist_traveled, inferred from the ratio of geometric length to distance range.

import { describe, it, expect } from 'vitest';
import { METRES_PER_UNIT, distRange, firstBacktrack, inferShapeDistUnit, shapeDistToMetres } from '../../src/network/shapeDistUnit.js';

describe('inferShapeDistUnit', () => {
  it('uses the exact international foot and mile', () => {
    // [C] International yard and pound agreement (1959): 1 ft = 0.3048 m, 1 mi = 5280 ft = 1609.344 m.
    expect(METRES_PER_UNIT.ft).toBe(0.3048);
    expect(METRES_PER_UNIT.mi).toBeCloseTo(5280 * 0.3048, 9);
  });

  const cases: [string, number, string][] = [
    ['metres', 1, 'm'],
    ['kilometres', 0.001, 'km'],
    ['feet', 1 / 0.3048, 'ft'],
    ['miles', 1 / 1609.344, 'mi'],
  ];
  for (const [name, unitsPerMetre, unit] of cases) {
    it(`recognises ${name}, allowing for shapes a little longer than the distances`, () => {
      // Shapes are often 0.5-2 % longer or shorter than the distances an agency computed [M, common practice].
      const samples = [4000, 5200, 880, 12000].map((lengthM, i) => ({
        lengthM,
        distRange: lengthM * unitsPerMetre * (1 + [0.01, -0.005, 0.02, 0][i]),
      }));
      const fit = inferShapeDistUnit(samples)!;
      expect(fit.unit).toBe(unit);
      expect(fit.metresPerUnit).toBeCloseTo(1 / unitsPerMetre, 9);
      expect(fit.poorFit).toBe(false);
      expect(fit.shapesUsed).toBe(4);
    });
  }

  it('flags a loose fit but keeps the nearest unit', () => {
    const fit = inferShapeDistUnit([{ lengthM: 1080, distRange: 1000 }])!;
    expect(fit.unit).toBe('m');
    expect(fit.poorFit).toBe(true);
    expect(fit.misfit).toBeCloseTo(0.08, 6);
  });

  it('falls back to an arbitrary scale when no unit is near', () => {
    // Distances in units of 0.5 m (hypothetical): 2 units per metre.
    const fit = inferShapeDistUnit([
      { lengthM: 3000, distRange: 6000 },
      { lengthM: 1000, distRange: 2000 },
    ])!;
    expect(fit.unit).toBe('scale');
    expect(fit.metresPerUnit).toBeCloseTo(0.5, 12);
    expect(fit.poorFit).toBe(true);
  });

  it('uses the median ratio, so one odd shape does not move the unit', () => {
    const fit = inferShapeDistUnit([
      { lengthM: 1000, distRange: 1.0 },
      { lengthM: 2000, distRange: 2.01 },
      { lengthM: 3000, distRange: 0.5 }, // a broken shape
    ])!;
    expect(fit.unit).toBe('km');
  });

  it('returns null without usable samples and rejects bad options', () => {
    expect(inferShapeDistUnit([])).toBeNull();
    expect(
      inferShapeDistUnit([
        { lengthM: 100, distRange: 0 },
        { lengthM: 0, distRange: 3 },
        { lengthM: 5, distRange: NaN },
      ]),
    ).toBeNull();
    expect(() => inferShapeDistUnit([], { goodFit: 0.2, acceptFit: 0.1 })).toThrow(/goodFit/);
  });
});

describe('distance helpers', () => {
  it('distRange spans the first to the last finite value', () => {
    expect(distRange([NaN, 2, 3, NaN, 7.5, NaN])).toBe(5.5);
    expect(distRange([NaN, 4])).toBeNaN();
  });
  it('firstBacktrack finds the first decrease, skipping blanks', () => {
    expect(firstBacktrack([0, 1, 1, 2.5, NaN, 4])).toBe(-1);
    expect(firstBacktrack([0, 1.2, NaN, 1.1, 3])).toBe(3);
  });
  it('firstBacktrack lets a fall within the tolerance pass and stops at the first larger one', () => {
    expect(firstBacktrack([0, 1, 1 - 1e-12, 2], 1e-9)).toBe(-1);
    expect(firstBacktrack([0, 1, 1 - 1e-12, 2])).toBe(2);
    expect(firstBacktrack([0, 5, NaN, 4, 3], 0.5)).toBe(3);
  });
  it('shapeDistToMetres converts from the first stop, or gives null with a blank', () => {
    expect(shapeDistToMetres([1.5, 1.75, 2.5], 1000)).toEqual([0, 250, 1000]);
    expect(shapeDistToMetres([0, NaN, 2], 1)).toBeNull();
    expect(shapeDistToMetres([], 1)).toEqual([]);
  });
});
