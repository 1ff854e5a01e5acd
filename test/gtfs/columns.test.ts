// Grouping rows by owner and sorting them by sequence, against a plain stable sort of row objects
// (Array.prototype.sort, stable since ES2019 [C, ECMA-262]) on random inputs.

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { groupAndSort, IntColumn } from '../../src/gtfs/columns.js';

describe('groupAndSort', () => {
  it('orders rows by owner, then sequence, keeping input order on ties', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.nat(5), fc.integer({ min: 0, max: 20 })), { maxLength: 200 }), (rows) => {
        const owner = new IntColumn(1);
        const seq = new IntColumn(1);
        for (const [o, q] of rows) {
          owner.push(o);
          seq.push(q);
        }
        const { order, offsets } = groupAndSort(owner.data, seq.data, rows.length, 6);
        const want = rows.map((r, i) => ({ o: r[0], q: r[1], i })).sort((a, b) => a.o - b.o || a.q - b.q);
        expect([...order]).toEqual(want.map((r) => r.i));
        for (let g = 0; g < 6; g++) expect(offsets[g + 1] - offsets[g]).toBe(rows.filter((r) => r[0] === g).length);
      }),
      { numRuns: 200, seed: 7 },
    );
  });
});
