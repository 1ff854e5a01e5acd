// Two figures of a whole pattern set that the feed check, the comparison and the history share: the stops
// served and the median gap between consecutive passenger stops. One definition, below every stage.

import { median } from '../common/median.js';
import type { PatternSet } from './types.js';

/**
 * Stops served: distinct stops where some pattern takes on or lets off riders (non-passenger timing points
 * left out), the audit's count of stops. One definition for check, compare and the history.
 */
export function passengerStopsServed(set: PatternSet): number {
  const served = new Set<number>();
  for (const p of set.patterns) for (let i = 0; i < p.stopIdx.length; i++) if (p.passengerStop[i] !== false) served.add(p.stopIdx[i]);
  return served.size;
}

/** Median of the gaps between consecutive passenger stops over every pattern, metres. */
export function medianGapM(set: PatternSet): number | null {
  const gaps: number[] = [];
  for (const p of set.patterns) {
    let prev = -1;
    for (let i = 0; i < p.stopIdx.length; i++) {
      if (p.passengerStop[i] === false) continue;
      if (prev >= 0) gaps.push(p.distAlongM[i] - p.distAlongM[prev]);
      prev = i;
    }
  }
  return gaps.length === 0 ? null : median(gaps);
}
