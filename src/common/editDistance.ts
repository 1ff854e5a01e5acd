// Levenshtein edit distance, the one measure of "nearly the same text" (a header name typed with a slip,
// a stop name spelt differently), and the names nearest to one that was not found.

/** Levenshtein distance, stopping early above `max` (returns max + 1 then). */
export function editDistance(a: string, b: string, max: number): number {
  if (Math.abs(a.length - b.length) > max) return max + 1;
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    let best = i;
    for (let j = 1; j <= b.length; j++) {
      cur[j] = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1));
      best = Math.min(best, cur[j]);
    }
    if (best > max) return max + 1;
    prev = cur;
  }
  return prev[b.length];
}

/**
 * The names in `names` nearest to `wanted` (compared as `key` makes them, e.g. lower case), closest first,
 * at most `limit`, none further than `max` edits.
 */
export function nearestNames(
  wanted: string,
  names: Iterable<string>,
  { max, limit, key = (s: string) => s }: { max: number; limit: number; key?: (s: string) => string },
): string[] {
  const w = key(wanted);
  const scored: [string, number][] = [];
  for (const n of new Set(names)) {
    const d = editDistance(w, key(n), max);
    if (d <= max) scored.push([n, d]);
  }
  scored.sort((x, y) => x[1] - y[1] || x[0].localeCompare(y[0]));
  return scored.slice(0, limit).map(([n]) => n);
}
