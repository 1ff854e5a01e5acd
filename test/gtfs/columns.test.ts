// Grouping rows by owner and sorting them by sequence, against a plain stable sort of row objects
// (Array.prototype.sort, stable since ES2019 [C, ECMA-262]) on random inputs.

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { groupAndSort, IntColumn, TripRowBlocks } from '../../src/gtfs/columns.js';

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

describe('TripRowBlocks', () => {
  // rows as [trip, seq]; stop holds the arrival index so each row can be told apart
  const rowsArb = fc.array(fc.tuple(fc.nat(4), fc.integer({ min: 0, max: 6 })), { maxLength: 60 });

  it('keeps each trip together across full blocks, sorted stably and without repeated sequences', () => {
    fc.assert(
      fc.property(rowsArb, fc.integer({ min: 1, max: 5 }), fc.boolean(), (raw, blockRows, grouped) => {
        // grouped: rows sorted by trip (stably), the usual layout of stop_times.txt
        const rows = grouped ? raw.map((r, i) => ({ t: r[0], q: r[1], i })).sort((a, b) => a.t - b.t).map((r) => [r.t, r.q] as const) : raw;
        const blocks = new TripRowBlocks(5, blockRows);
        rows.forEach(([t, q], i) => blocks.push(t, i, q, 10 * i, 10 * i + 1, i / 2, i & 1, (i >> 1) & 1));
        const reappears = rows.some(([t], i) => i > 0 && rows[i - 1][0] !== t && rows.slice(0, i).some(([u]) => u === t));
        expect(blocks.scattered).toBe(reappears);
        expect(blocks.rows).toBe(rows.length);
        if (blocks.scattered) {
          const flat = blocks.flatRows();
          expect([...flat.stop.subarray(0, flat.used)]).toEqual(rows.map((_, i) => i));
          expect([...flat.owner.subarray(0, flat.used)]).toEqual(rows.map(([t]) => t));
          return;
        }
        for (let t = 0; t < 5; t++) {
          // reference: that trip's rows, stable sort by seq (ECMA-262 stable sort), first of each seq kept
          const mine = rows.map(([u, q], i) => ({ u, q, i })).filter((r) => r.u === t).sort((a, b) => a.q - b.q);
          const want = mine.filter((r, k) => k === 0 || r.q !== mine[k - 1].q);
          if (mine.length === 0) {
            expect(blocks.tripCount[t]).toBe(0);
            continue;
          }
          blocks.sortRun(t);
          expect(blocks.dropRepeats(t)).toBe(mine.length - want.length);
          const b = blocks.blocks[blocks.tripBlock[t]];
          const a = blocks.tripStart[t];
          const m = blocks.tripCount[t];
          expect(a + m).toBeLessThanOrEqual(b.used);
          expect([...b.stop.subarray(a, a + m)]).toEqual(want.map((r) => r.i));
          expect([...b.seq.subarray(a, a + m)]).toEqual(want.map((r) => r.q));
          expect([...b.arr.subarray(a, a + m)]).toEqual(want.map((r) => 10 * r.i));
          expect([...b.dep.subarray(a, a + m)]).toEqual(want.map((r) => 10 * r.i + 1));
          expect([...b.dist.subarray(a, a + m)]).toEqual(want.map((r) => r.i / 2));
          expect([...b.tp.subarray(a, a + m)]).toEqual(want.map((r) => r.i & 1));
          expect([...b.ns.subarray(a, a + m)]).toEqual(want.map((r) => (r.i >> 1) & 1));
        }
      }),
      { numRuns: 400, seed: 11 },
    );
  });
});
