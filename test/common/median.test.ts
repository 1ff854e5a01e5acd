// median: the one median every stage uses (gaps, speeds, run times, dwell, the page's band).
import { describe, expect, it } from 'vitest';
import { median } from '../../src/common/median.js';

describe('median', () => {
  it('is the middle value, or the mean of the two middle ones', () => {
    // [D] sorted 1 2 3: the middle is 2; sorted 1 2 3 4: (2 + 3) / 2 = 2.5
    expect(median([3, 1, 2])).toBe(2);
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(median(Float64Array.of(10, -5))).toBe(2.5);
  });

  it('sorts numerically, not as text', () => {
    expect(median([100, 9, 20])).toBe(20); // as text the order would be 100, 20, 9
  });

  it('gives NaN for no values, or the value the caller names', () => {
    expect(median([])).toBeNaN();
    expect(median([], 0)).toBe(0);
  });

  it("does not reorder the caller's list", () => {
    const xs = [3, 1, 2];
    median(xs);
    expect(xs).toEqual([3, 1, 2]);
  });
});
