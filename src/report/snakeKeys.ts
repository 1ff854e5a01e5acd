// One key style for every JSON document the commands print or write: snake_case, as summary.json. The
// library's objects keep camelCase property names; this turns a document's keys at the boundary, so the
// check, compare, history and error documents and summary.json read alike for the jobs that parse them.
// Keys that are data rather than names (finding codes, GTFS field names, speed families) are lower-case
// already and pass through unchanged.

/** A camelCase name in snake_case: `contentHash` -> `content_hash`, `medianGapM` -> `median_gap_m`. */
export function snakeName(key: string): string {
  return key.replace(/([a-z0-9])([A-Z])/g, '$1_$2').replace(/([A-Z])([A-Z][a-z])/g, '$1_$2').toLowerCase();
}

/** A deep copy of value with every object key in snake_case; arrays and scalars keep their order and values. */
export function snakeKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(snakeKeys);
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) out[snakeName(k)] = snakeKeys(v);
    return out;
  }
  return value;
}
