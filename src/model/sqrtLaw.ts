// The uniform-demand optimum spacing (square-root law) and the cost per rider it minimises.
// Per rider: C(s) = w*(s/2)/v + p*L/s (two trip ends each walking s/4 on average; L/s stops passed).

export interface SqrtLawInput {
  walkSpeedMps: number;
  lostTimePerStopS: number;
  meanTripLengthM: number;
  walkWeight: number;
}

/** s* = sqrt(2 v p L / w); with `oneEndFixed` (one trip end at a stop) sqrt(4 v p L / w). Metres. */
export function sqrtLawSpacingM(
  { walkSpeedMps, lostTimePerStopS, meanTripLengthM, walkWeight }: SqrtLawInput,
  { oneEndFixed = false }: { oneEndFixed?: boolean } = {},
): number {
  if (!(walkSpeedMps > 0) || !(lostTimePerStopS >= 0) || !(meanTripLengthM >= 0) || !(walkWeight > 0)) {
    throw new RangeError(`sqrtLawSpacingM: bad input v=${walkSpeedMps} p=${lostTimePerStopS} L=${meanTripLengthM} w=${walkWeight}`);
  }
  const factor = oneEndFixed ? 4 : 2;
  return Math.sqrt((factor * walkSpeedMps * lostTimePerStopS * meanTripLengthM) / walkWeight);
}

/** C(s) in seconds per rider: weighted walk w*(s/2)/v plus ride delay p*L/s. */
export function costPerRiderS(spacingM: number, { walkSpeedMps, lostTimePerStopS, meanTripLengthM, walkWeight }: SqrtLawInput): number {
  if (!(spacingM > 0)) throw new RangeError(`costPerRiderS: spacing must be above 0, got ${spacingM}`);
  return (walkWeight * (spacingM / 2)) / walkSpeedMps + (lostTimePerStopS * meanTripLengthM) / spacingM;
}
