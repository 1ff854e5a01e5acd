// Typed storage for the big tables: growable columns (shapes), growable columns of stop_times rows, and
// the grouping of rows by owner (trip or shape) sorted by sequence: rows arrive in any order and are
// never held as one object each.

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

/**
 * stop_times rows as growable typed columns, in arrival order; rows [0, used) are live. The folding
 * reader (stopTimesStore.ts) holds one trip's rows in one, and a table not grouped by trip in another.
 */
export class RowColumns {
  owner = new Int32Array(256);
  stop = new Int32Array(256);
  seq = new Int32Array(256);
  arr = new Int32Array(256);
  dep = new Int32Array(256);
  dist = new Float64Array(256);
  tp = new Uint8Array(256);
  ns = new Uint8Array(256);
  used = 0;

  push(owner: number, stop: number, seq: number, arr: number, dep: number, dist: number, tp: number, ns: number): void {
    if (this.used === this.stop.length) this.grow();
    const w = this.used++;
    this.owner[w] = owner;
    this.stop[w] = stop;
    this.seq[w] = seq;
    this.arr[w] = arr;
    this.dep[w] = dep;
    this.dist[w] = dist;
    this.tp[w] = tp;
    this.ns[w] = ns;
  }

  /** Sorts the rows by stop_sequence (stably, arrival order among equals) and drops repeats; returns how many. */
  sortAndDedupe(): number {
    const m = this.used;
    const cols = this.columns();
    let sorted = true;
    for (let q = 1; q < m; q++) if (this.seq[q] < this.seq[q - 1]) sorted = false;
    if (!sorted) {
      const order = Array.from({ length: m }, (_, q) => q).sort((x, y) => this.seq[x] - this.seq[y] || x - y);
      for (const c of cols) {
        const copy = c.slice(0, m);
        for (let q = 0; q < m; q++) c[q] = copy[order[q]];
      }
    }
    // [GTFS Schedule reference: stop_sequence unique per trip] the first row of a repeated value is kept
    let w = m > 0 ? 1 : 0;
    for (let p = 1; p < m; p++) {
      if (this.seq[p] === this.seq[w - 1]) continue;
      if (w !== p) for (const c of cols) c[w] = c[p];
      w++;
    }
    this.used = w;
    return m - w;
  }

  private columns(): (Int32Array | Float64Array | Uint8Array)[] {
    return [this.owner, this.stop, this.seq, this.arr, this.dep, this.dist, this.tp, this.ns];
  }

  private grow(): void {
    const n = this.stop.length * 2;
    const g = <T extends Int32Array | Float64Array | Uint8Array>(a: T, make: (k: number) => T): T => {
      const b = make(n);
      b.set(a);
      return b;
    };
    this.owner = g(this.owner, (k) => new Int32Array(k));
    this.stop = g(this.stop, (k) => new Int32Array(k));
    this.seq = g(this.seq, (k) => new Int32Array(k));
    this.arr = g(this.arr, (k) => new Int32Array(k));
    this.dep = g(this.dep, (k) => new Int32Array(k));
    this.dist = g(this.dist, (k) => new Float64Array(k));
    this.tp = g(this.tp, (k) => new Uint8Array(k));
    this.ns = g(this.ns, (k) => new Uint8Array(k));
  }
}
