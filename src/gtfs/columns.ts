// Typed storage for the big tables: growable columns (shapes), blocks of stop_times rows kept together
// per trip (so the Feed's per-trip arrays are views, not copies), and the grouping of rows by owner
// (trip or shape) sorted by sequence: rows arrive in any order and are never held as one object each.

/** Growable typed column. */
export class IntColumn {
  data: Int32Array;
  length = 0;
  constructor(capacity = 1024) {
    this.data = new Int32Array(capacity);
  }
  push(v: number): void {
    if (this.length === this.data.length) {
      const next = new Int32Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
}

export class FloatColumn {
  data: Float64Array;
  length = 0;
  constructor(capacity = 1024) {
    this.data = new Float64Array(capacity);
  }
  push(v: number): void {
    if (this.length === this.data.length) {
      const next = new Float64Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
}

/**
 * Row indices grouped by owner (0..owners-1) and sorted within each group by seq, stably; returns the
 * permutation and the start of each group (offsets has owners+1 entries).
 */
export function groupAndSort(owner: Int32Array, seq: Int32Array, n: number, owners: number): { order: Int32Array; offsets: Int32Array } {
  const offsets = new Int32Array(owners + 1);
  for (let r = 0; r < n; r++) offsets[owner[r] + 1]++;
  for (let g = 0; g < owners; g++) offsets[g + 1] += offsets[g];
  const fill = offsets.slice(0, owners);
  const order = new Int32Array(n);
  for (let r = 0; r < n; r++) order[fill[owner[r]]++] = r;
  for (let g = 0; g < owners; g++) {
    const a = offsets[g];
    const b = offsets[g + 1];
    let sorted = true;
    for (let k = a + 1; k < b; k++) if (seq[order[k]] < seq[order[k - 1]]) sorted = false;
    if (!sorted) {
      const part = Array.from(order.subarray(a, b));
      part.sort((x, y) => seq[x] - seq[y] || x - y);
      order.set(part, a);
    }
  }
  return { order, offsets };
}

/** One block of stop_times rows, column by column; rows [0, used) are live. */
export interface RowBlock {
  owner: Int32Array;
  stop: Int32Array;
  seq: Int32Array;
  arr: Int32Array;
  dep: Int32Array;
  dist: Float64Array;
  tp: Uint8Array;
  ns: Uint8Array;
  used: number;
}

function newBlock(rows: number): RowBlock {
  return {
    owner: new Int32Array(rows),
    stop: new Int32Array(rows),
    seq: new Int32Array(rows),
    arr: new Int32Array(rows),
    dep: new Int32Array(rows),
    dist: new Float64Array(rows),
    tp: new Uint8Array(rows),
    ns: new Uint8Array(rows),
    used: 0,
  };
}

/** Copies row `from` of block a to row `to` of block b, every column. */
function copyRow(a: RowBlock, from: number, b: RowBlock, to: number): void {
  b.owner[to] = a.owner[from];
  b.stop[to] = a.stop[from];
  b.seq[to] = a.seq[from];
  b.arr[to] = a.arr[from];
  b.dep[to] = a.dep[from];
  b.dist[to] = a.dist[from];
  b.tp[to] = a.tp[from];
  b.ns[to] = a.ns[from];
}

/**
 * stop_times rows of the kept trips in fixed-size blocks of typed columns, each trip's rows together in
 * one block (a trip cut by a full block is moved whole to the next), so that the per-trip arrays of the
 * Feed can be views into the blocks: no growable column doubling and copying, no second copy per trip.
 * When a trip's rows come back after another trip's (the table is not grouped by trip), `scattered` is
 * set; the rows are all still there, in arrival order (see flatRows), for the general grouping.
 */
export class TripRowBlocks {
  readonly blocks: RowBlock[] = [];
  /** Per trip: its block, first row in it and row count (valid as one run unless scattered). */
  readonly tripBlock: Int32Array;
  readonly tripStart: Int32Array;
  readonly tripCount: Int32Array;
  scattered = false;
  rows = 0;
  private cur: RowBlock;
  private last = -1;

  constructor(
    trips: number,
    private readonly blockRows = 1 << 16,
  ) {
    this.tripBlock = new Int32Array(trips).fill(-1);
    this.tripStart = new Int32Array(trips);
    this.tripCount = new Int32Array(trips);
    this.cur = newBlock(blockRows);
    this.blocks.push(this.cur);
  }

  push(t: number, stop: number, seq: number, arr: number, dep: number, dist: number, tp: number, ns: number): void {
    let b = this.cur;
    if (t !== this.last) {
      if (this.tripCount[t] > 0) this.scattered = true;
      if (b.used === b.stop.length) b = this.next(0);
      if (this.tripCount[t] === 0) {
        this.tripBlock[t] = this.blocks.length - 1;
        this.tripStart[t] = b.used;
      }
      this.last = t;
    } else if (b.used === b.stop.length) {
      b = this.next(this.scattered ? 0 : this.tripCount[t]);
      if (!this.scattered) {
        this.tripBlock[t] = this.blocks.length - 1;
        this.tripStart[t] = 0;
      }
    }
    const w = b.used++;
    b.owner[w] = t;
    b.stop[w] = stop;
    b.seq[w] = seq;
    b.arr[w] = arr;
    b.dep[w] = dep;
    b.dist[w] = dist;
    b.tp[w] = tp;
    b.ns[w] = ns;
    this.tripCount[t]++;
    this.rows++;
  }

  /** Starts a new block, moving the last `move` rows of the current one (the trip being read) into it. */
  private next(move: number): RowBlock {
    const old = this.cur;
    const b = newBlock(Math.max(this.blockRows, 2 * move));
    for (let q = 0; q < move; q++) copyRow(old, old.used - move + q, b, q);
    old.used -= move;
    b.used = move;
    this.blocks.push(b);
    this.cur = b;
    return b;
  }

  /** Sorts the run of trip t by seq (stably) in place, if it is not sorted already. */
  sortRun(t: number): void {
    const b = this.blocks[this.tripBlock[t]];
    const a = this.tripStart[t];
    const m = this.tripCount[t];
    let sorted = true;
    for (let p = a + 1; p < a + m; p++) if (b.seq[p] < b.seq[p - 1]) sorted = false;
    if (sorted) return;
    const order = Array.from({ length: m }, (_, q) => a + q).sort((x, y) => b.seq[x] - b.seq[y] || x - y);
    const tmp = newBlock(m);
    for (let q = 0; q < m; q++) copyRow(b, order[q], tmp, q);
    for (let q = 0; q < m; q++) copyRow(tmp, q, b, a + q);
  }

  /** Drops rows of trip t's sorted run repeating the previous stop_sequence; returns how many were dropped. */
  dropRepeats(t: number): number {
    const b = this.blocks[this.tripBlock[t]];
    const a = this.tripStart[t];
    const m = this.tripCount[t];
    let w = a + 1;
    for (let p = a + 1; p < a + m; p++) {
      if (b.seq[p] === b.seq[w - 1]) continue;
      if (w !== p) copyRow(b, p, b, w);
      w++;
    }
    const dropped = m > 0 ? a + m - w : 0;
    this.tripCount[t] = m - dropped;
    return dropped;
  }

  /** Every live row in arrival order, as one block (for a table not grouped by trip). */
  flatRows(): RowBlock {
    const flat = newBlock(this.rows);
    let w = 0;
    for (const b of this.blocks) for (let r = 0; r < b.used; r++) copyRow(b, r, flat, w++);
    flat.used = w;
    return flat;
  }
}
