// The square-root optimum of one pattern, with the lost time a bus actually incurs per stop: a stop that
// riders use less than once per trip is sometimes skipped, so the expected lost time is p * P(lambda(s)),
// lambda(s) the trip ends per trip in a catchment of length s. Solved as a fixed point
// s = sqrt(2 v p P(rho s) L / w); with the always-stops model P = 1 and it is the plain square-root law.

import type { CostSettings } from './corridor.js';
import { sqrtLawSpacingM } from './sqrtLaw.js';
import { poissonStopProbability } from './stopping.js';

export interface EffectiveOptimum {
  spacingM: number;
  effectiveLostTimeS: number; // p * P at the optimum
  stopProbability: number;
}

export function effectiveOptimum(
  settings: CostSettings,
  {
    meanTripLengthM,
    tripEndsPerTripPerM,
    meanObservedShare = null,
  }: { meanTripLengthM: number; tripEndsPerTripPerM: number; meanObservedShare?: number | null },
): EffectiveOptimum {
  const base = { walkSpeedMps: settings.walkSpeedMps, walkWeight: settings.walkWeight, meanTripLengthM: Math.max(meanTripLengthM, 0) };
  const prob = (s: number) => {
    if (settings.stoppingModel === 'always') return 1;
    if (settings.stoppingModel === 'observed' && meanObservedShare !== null) return meanObservedShare;
    return poissonStopProbability(tripEndsPerTripPerM * s);
  };
  let s = sqrtLawSpacingM({ ...base, lostTimePerStopS: settings.lostTimePerStopS });
  let P = 1;
  for (let it = 0; it < 60 && s > 0; it++) {
    P = prob(s);
    const next = sqrtLawSpacingM({ ...base, lostTimePerStopS: settings.lostTimePerStopS * P });
    if (Math.abs(next - s) < 1e-6) {
      s = next;
      break;
    }
    s = next;
  }
  P = prob(s);
  return { spacingM: s, effectiveLostTimeS: settings.lostTimePerStopS * P, stopProbability: P };
}
