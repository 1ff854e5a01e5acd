// One key style for JSON documents built from TypeScript objects: camelCase property names become
// snake_case (walkAddedPaxMinPerDay -> walk_added_pax_min_per_day), as summary.json spells them. Values
// (ids, names, text) are never changed; keys already in snake_case pass through.

/** The key in snake_case. */
export function snakeKey(key: string): string {
  return key
    .replace(/([a-z0-9])([A-Z])/g, '$1_$2')
    .replace(/([A-Z])([A-Z][a-z])/g, '$1_$2')
    .toLowerCase();
}

/** A deep copy of a JSON-like value with every object key in snake_case. */
export function snakeKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(snakeKeys);
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) out[snakeKey(k)] = snakeKeys(v);
    return out;
  }
  return value;
}
