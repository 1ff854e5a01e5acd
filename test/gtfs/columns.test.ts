// Grouping rows by owner and sorting them by sequence, against a plain stable sort of row objects
// (Array.prototype.sort, stable since ES2019 [C, ECMA-262]) on random inputs.

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { groupAndSort, IntColumn, RowColumns } from '../../src/gtfs/columns.js';

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

describe('RowColumns', () => {
  // rows as seq values; stop holds the arrival index so each row can be told apart. Up to 600 rows, so
  // the columns grow past their first 256.
  const rowsArb = fc.array(fc.integer({ min: 0, max: 40 }), { maxLength: 600 });

  it('keeps rows in arrival order, and sorts them stably without repeated sequences', () => {
    fc.assert(
      fc.property(rowsArb, (seqs) => {
        const rows = new RowColumns();
        seqs.forEach((q, i) => rows.push(i % 3, i, q, 10 * i, 10 * i + 1, i / 2, i & 1, (i >> 1) & 1));
        expect(rows.used).toBe(seqs.length);
        expect([...rows.stop.subarray(0, rows.used)]).toEqual(seqs.map((_, i) => i));
        expect([...rows.owner.subarray(0, rows.used)]).toEqual(seqs.map((_, i) => i % 3));
        // reference: stable sort by seq (ECMA-262 stable sort), first of each seq kept
        const mine = seqs.map((q, i) => ({ q, i })).sort((a, b) => a.q - b.q);
        const want = mine.filter((r, k) => k === 0 || r.q !== mine[k - 1].q);
        expect(rows.sortAndDedupe()).toBe(mine.length - want.length);
        const m = rows.used;
        expect(m).toBe(want.length);
        expect([...rows.owner.subarray(0, m)]).toEqual(want.map((r) => r.i % 3));
        expect([...rows.stop.subarray(0, m)]).toEqual(want.map((r) => r.i));
        expect([...rows.seq.subarray(0, m)]).toEqual(want.map((r) => r.q));
        expect([...rows.arr.subarray(0, m)]).toEqual(want.map((r) => 10 * r.i));
        expect([...rows.dep.subarray(0, m)]).toEqual(want.map((r) => 10 * r.i + 1));
        expect([...rows.dist.subarray(0, m)]).toEqual(want.map((r) => r.i / 2));
        expect([...rows.tp.subarray(0, m)]).toEqual(want.map((r) => r.i & 1));
        expect([...rows.ns.subarray(0, m)]).toEqual(want.map((r) => (r.i >> 1) & 1));
      }),
      { numRuns: 300, seed: 11 },
    );
  });
});
