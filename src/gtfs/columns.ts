// Growable typed columns for the big tables, and the grouping of their rows by owner (trip or shape)
// sorted by sequence: rows arrive in any order and are never held as one object each.

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
