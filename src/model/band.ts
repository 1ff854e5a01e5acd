// The near-optimal band: since C(s)/C(s*) = (x + 1/x)/2 with x = s/s*, the spacings costing at most a
// tolerance e more than the optimum lie between the two roots of x + 1/x = 2(1 + e).

/** The roots [x_lo, x_hi] of x + 1/x = 2(1+e), x_lo * x_hi = 1. */
export function bandRatios(tolerance: number): [number, number] {
  if (!(tolerance >= 0) || !Number.isFinite(tolerance)) throw new RangeError(`bandRatios: tolerance must be >= 0, got ${tolerance}`);
  const k = 1 + tolerance;
  const root = Math.sqrt(k * k - 1);
  return [k - root, k + root];
}

/** C(s)/C(s*) for x = s/s*. */
export function relativeCost(ratio: number): number {
  if (!(ratio > 0)) throw new RangeError(`relativeCost: ratio must be above 0, got ${ratio}`);
  return (ratio + 1 / ratio) / 2;
}

/** The band in metres around an optimum spacing. */
export function bandM(optimalSpacingM: number, tolerance: number): { lowM: number; highM: number } {
  const [lo, hi] = bandRatios(tolerance);
  return { lowM: lo * optimalSpacingM, highM: hi * optimalSpacingM };
}
