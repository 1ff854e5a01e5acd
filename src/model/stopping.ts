// The chance that a bus serves a stop on a given trip: always, Poisson from the expected number of
// riders using the stop on that trip, or an observed share from realtime data.

/** Poisson: P = 1 - exp(-lambda), lambda = expected boardings + alightings per trip at the stop. */
export function poissonStopProbability(lambdaPerTrip: number): number {
  if (!(lambdaPerTrip >= 0)) return 0;
  return 1 - Math.exp(-lambdaPerTrip);
}

/**
 * Stopping probability by model. For 'observed', `observedShare` is the share seen today at this stop
 * with `baseLambda` riders per trip; a changed lambda keeps the observed share's implied rate and scales it.
 */
export function stopProbability(
  lambdaPerTrip: number,
  {
    model,
    observedShare = null,
    baseLambda = null,
  }: { model: 'always' | 'poisson' | 'observed'; observedShare?: number | null; baseLambda?: number | null },
): number {
  return stoppingProbability(lambdaPerTrip, model, observedShare, baseLambda);
}

/** stopProbability with its options as arguments, for the model's inner loops (no object a call). */
export function stoppingProbability(
  lambdaPerTrip: number,
  model: 'always' | 'poisson' | 'observed',
  observedShare: number | null,
  baseLambda: number | null,
): number {
  if (model === 'always') return 1;
  if (model === 'observed' && observedShare !== null && observedShare >= 0 && observedShare <= 1) {
    if (baseLambda === null || !(baseLambda > 0)) return observedShare;
    if (observedShare >= 1) return 1;
    const impliedRate = -Math.log(1 - observedShare); // the Poisson rate the observed share corresponds to
    return poissonStopProbability((impliedRate * lambdaPerTrip) / baseLambda);
  }
  return poissonStopProbability(lambdaPerTrip);
}
