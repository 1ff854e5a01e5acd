// Least-squares fit of observed gap run times to the lost-time model, giving the cruise speed and the
// braking-and-accelerating loss per stop that explain them.

/**
 * Accumulates (gapM, runTimeS, stops at the two ends) and fits
 *   runTimeS = gapM / V + lossHalfS * (stoppedAtStart + stoppedAtEnd)
 * where a bus that serves a stop loses V/(2d) braking into it and V/(2a) + re-entry leaving it
 * (DESIGN.md section 4, kinematics [D]); the per-stop loss V/(2a) + V/(2d) + t_reentry is 2 * lossHalfS.
 * Splitting the loss equally between the two ends is exact when every stop is served and unbiased
 * when serving the start and the end of a gap are equally likely.
 */
export class RunTimeFit {
  private sxx = 0;
  private sxh = 0;
  private shh = 0;
  private sxt = 0;
  private sht = 0;
  count = 0;

  add(gapM: number, runTimeS: number, stopsServed: number): void {
    this.sxx += gapM * gapM;
    this.sxh += gapM * stopsServed;
    this.shh += stopsServed * stopsServed;
    this.sxt += gapM * runTimeS;
    this.sht += stopsServed * runTimeS;
    this.count++;
  }

  /** The fitted cruise speed (m/s) and loss per served stop (s), or null when the data cannot separate them. */
  solve(): { cruiseSpeedMps: number; lossPerStopS: number } | null {
    if (this.count < 3) return null;
    const det = this.sxx * this.shh - this.sxh * this.sxh;
    if (!(Math.abs(det) > 1e-9 * this.sxx * Math.max(this.shh, 1))) return null;
    const invV = (this.sxt * this.shh - this.sxh * this.sht) / det;
    const half = (this.sxx * this.sht - this.sxh * this.sxt) / det;
    if (!(invV > 0)) return null;
    return { cruiseSpeedMps: 1 / invV, lossPerStopS: 2 * half };
  }
}
