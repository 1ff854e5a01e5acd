// The reports' en-US number text against ICU itself: Intl.NumberFormat('en-US') with fixed fraction
// digits is the reference (ECMA-402 as V8 implements it through ICU), on hand-picked rounding cases and
// on many random values of every magnitude the reports print.
import { describe, expect, it } from 'vitest';
import { groupedFixed } from '../../src/report/numberText.js';
// @ts-expect-error: a plain ES module of the generators, without type declarations
import { prng } from '../../scripts/lib/seeded.mjs';

const intl = (v: number, d: number): string =>
  new Intl.NumberFormat('en-US', { minimumFractionDigits: d, maximumFractionDigits: d }).format(v);

describe('groupedFixed', () => {
  it('prints the cases where shortest-decimal rounding and toFixed differ as ICU does', () => {
    const cases: [number, number][] = [
      [1.005, 2],
      [1.45, 1],
      [2.675, 2],
      [8.345, 2],
      [0.125, 2],
      [2.5, 0],
      [-2.5, 0],
      [0.5, 0],
      [9.995, 2],
      [999.95, 1],
      [999999.5, 0],
      [-0.04, 1],
      [-0.4, 0],
      [-0, 0],
      [-0, 2],
      [0, 3],
      [1234567.891, 0],
      [12345.678, 1],
      [1e20, 0],
      [1e21, 0],
      [5e-7, 6],
      [1e-7, 2],
      [0.000001, 6],
      [NaN, 1],
      [Infinity, 0],
      [-Infinity, 2],
      [99.5, 0],
      [0.95, 1],
      [0.05, 1],
    ];
    for (const [v, d] of cases) expect(groupedFixed(v, d), `${v} with ${d} digits`).toBe(intl(v, d));
    expect(groupedFixed(1.005, 2)).toBe('1.01'); // not toFixed's "1.00"
    expect(groupedFixed(1234567.891, 1)).toBe('1,234,567.9');
  });

  it('agrees with Intl.NumberFormat on 40 000 random values of every magnitude, sign and rounding', () => {
    const rand = prng(20261202);
    for (let i = 0; i < 40_000; i++) {
      const digits = Math.floor(rand() * 4);
      const scale = 10 ** (Math.floor(rand() * 14) - 4);
      let v: number;
      const kind = i % 4;
      if (kind === 0)
        v = rand() * scale; // any double
      else if (kind === 1)
        v = Math.round(rand() * 1e6) / 1000 + 0.0005; // halves at the third decimal
      else if (kind === 2)
        v = Math.round(rand() * scale); // integers
      else v = (Math.floor(rand() * 2000) + 0.5) / 10 ** digits; // exact-looking halves at the last place
      if (rand() < 0.3) v = -v;
      expect(groupedFixed(v, digits)).toBe(intl(v, digits));
    }
  });
});
