// How robust the headline figures and the candidates are: the same audit at walk weights 1.5 and 2.5 and at
// band tolerances 0.05 and 0.10, everything else unchanged. A case whose settings are the base audit's own
// (band tolerance 0.05 by default) reuses the base analyses and candidates instead of computing them again.

import type { Feed } from '../gtfs/types.js';
import type { Candidate, SensitivityCase } from './types.js';
import type { ModelParams } from '../model/params.js';
import type { PreparedPattern } from '../model/preparePattern.js';
import { analysePattern, patternParts, type PatternAnalysis, type PatternParts } from './verdicts.js';
import { buildCandidates, candidateKey, type CandidateOptions } from './candidates.js';

export interface SensitivitySetting {
  label: string;
  walkWeight: number;
  bandTolerance: number;
}

/** The four settings of the design: walk weight 1.5 and 2.5, band tolerance 0.05 and 0.10. */
export function sensitivitySettings(params: ModelParams): SensitivitySetting[] {
  return [
    { label: 'walk_weight=1.5', walkWeight: 1.5, bandTolerance: params.band_tolerance },
    { label: 'walk_weight=2.5', walkWeight: 2.5, bandTolerance: params.band_tolerance },
    { label: 'band_tolerance=0.05', walkWeight: params.walk_weight, bandTolerance: 0.05 },
    { label: 'band_tolerance=0.10', walkWeight: params.walk_weight, bandTolerance: 0.1 },
  ];
}

/** How many of the base case's leading candidates are compared in candidatesKept. */
export const SENSITIVITY_TOP_CANDIDATES = 10;

export function meanOptimalSpacingM(analyses: PatternAnalysis[]): number {
  const xs = analyses.map((a) => a.result.optimalSpacingM).filter((s) => s > 0);
  return xs.length ? xs.reduce((s, x) => s + x, 0) / xs.length : 0;
}

export function runSensitivity(
  feed: Feed,
  preps: PreparedPattern[],
  params: ModelParams,
  baseCandidates: Candidate[],
  {
    settings = sensitivitySettings(params),
    baseAnalyses,
    parts = preps.map((p) => patternParts(p, params)),
    reported = () => true,
    candidateOptions = {},
  }: {
    /** What the base candidates were built with besides the walking policy (the land-use evidence). */
    candidateOptions?: Omit<CandidateOptions, 'maxGapM' | 'reviewGaps'>;
    /** The routes a report shows (--routes and the other filters): the case figures count their patterns and candidates only; every figure is still computed on the whole network. */
    reported?: (routeId: string) => boolean;
    settings?: SensitivitySetting[];
    /** The base audit's analysePattern results for preps (at params' own settings), from which baseCandidates were built. */
    baseAnalyses?: PatternAnalysis[];
    /** patternParts of each prep, shared with the base audit (computed here when not given). */
    parts?: PatternParts[];
  } = {},
): { cases: SensitivityCase[]; robustKeys: Set<string> } {
  const top = baseCandidates.filter((c) => c.routeIds.some(reported)).slice(0, SENSITIVITY_TOP_CANDIDATES).map(candidateKey);
  let robustKeys = new Set(baseCandidates.map(candidateKey));
  const cases: SensitivityCase[] = [];
  for (const s of settings) {
    const isBase = baseAnalyses !== undefined && s.walkWeight === params.walk_weight && s.bandTolerance === params.band_tolerance;
    const analyses = isBase ? baseAnalyses : preps.map((p, i) => analysePattern(feed, p, params, { walkWeight: s.walkWeight, bandTolerance: s.bandTolerance, parts: parts[i], detail: false }));
    const cands = isBase ? baseCandidates : buildCandidates(feed, analyses, { ...candidateOptions, maxGapM: params.max_gap_m });
    const keys = new Set(cands.map(candidateKey));
    robustKeys = new Set([...robustKeys].filter((k) => keys.has(k)));
    const shown = analyses.filter((a) => reported(a.result.routeId));
    cases.push({
      label: s.label,
      walkWeight: s.walkWeight,
      bandTolerance: s.bandTolerance,
      meanOptimalSpacingM: meanOptimalSpacingM(shown),
      closeStops: shown.reduce((n, a) => n + a.result.closeStops, 0),
      wideGaps: shown.reduce((n, a) => n + a.result.wideGaps, 0),
      paxMinLostPerDay: shown.reduce((n, a) => n + a.result.paxMinLostPerDay, 0),
      candidatesKept: top.filter((k) => keys.has(k)).length,
    });
  }
  return { cases, robustKeys };
}
