// The median of a list of numbers, the one answer every stage uses (gaps, speeds, run times, dwell, the
// report's headline band). Sorted as float64 values, so NaN sorts last and never scrambles the order.

/** Median of the values: the middle one, or the mean of the two middle ones; whenEmpty (NaN) for none. */
export function median(values: ArrayLike<number>, whenEmpty = NaN): number {
  if (values.length === 0) return whenEmpty;
  const s = Float64Array.from(values).sort();
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
}
