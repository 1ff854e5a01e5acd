// The one reader of numbers written as text in feeds and data files. GTFS writes numbers in decimal
// (GTFS Schedule reference, "Field Types": Float, Integer, Latitude, Longitude); JavaScript's Number()
// also reads "0x0A", "0b1010" and "0o12" as 10, "Infinity", and a string of spaces as 0, so it must not
// stand between a feed and a figure.

/** Optional sign, digits with an optional fraction (or a fraction alone), optional exponent. */
const DECIMAL = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/**
 * The number a decimal text stands for, spaces and tabs around it allowed; null for anything else (blank,
 * hexadecimal, binary, octal, Infinity, NaN, digit separators) and for a value too large to be finite.
 */
export function parseDecimal(text: string): number | null {
  const s = text.replace(/^[ \t]+|[ \t]+$/g, '');
  if (!DECIMAL.test(s)) return null;
  const v = Number(s);
  return Number.isFinite(v) ? v : null;
}
