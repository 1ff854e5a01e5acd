// How robust the headline figures and the candidates are: the same audit at walk weights 1.5 and 2.5 and at
// band tolerances 0.05 and 0.10, everything else unchanged. A case whose settings are the base audit's own
// (band tolerance 0.05 by default) reuses the base analyses and candidates instead of computing them again.
// Robustness is judged on the programme as accepted (programmeUnderCases): under each case the same ordered
// list is weighed again, each candidate given those ranked above it, and a candidate is robust when it still
// saves riders time in every case.

import type { Feed } from '../gtfs/types.js';
import type { Candidate, SensitivityCase } from './types.js';
import type { ModelParams } from '../model/params.js';
import type { PreparedPattern } from '../model/preparePattern.js';
import { analysePattern, patternParts, type PatternAnalysis, type PatternParts } from './verdicts.js';
import { buildCandidates, candidateKey, type CandidateOptions } from './candidates.js';
import { wideGapCounts } from './headlineFigures.js';

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

/** The walk weights the audit and its sensitivity cases model, params' own first: each pattern's optimiser runs for all at once. */
export function sensitivityWalkWeights(params: ModelParams): number[] {
  return [...new Set([params.walk_weight, ...sensitivitySettings(params).map((s) => s.walkWeight)])];
}

/** How many of the base case's leading candidates are compared in candidatesKept. */
export const SENSITIVITY_TOP_CANDIDATES = 10;

export function meanOptimalSpacingM(analyses: PatternAnalysis[]): number {
  const xs = analyses.map((a) => a.result.optimalSpacingM).filter((s) => s > 0);
  return xs.length ? xs.reduce((s, x) => s + x, 0) / xs.length : 0;
}

/** The programme weighed again under one case: each candidate's marginal net in the same order, and their sum. */
export interface ProgrammeUnderCase {
  label: string;
  marginalNetPaxMinPerDay: number[]; // by position in the programme
  netPaxMinPerDay: number;
}

/**
 * The programme as accepted, weighed again in the same order at each case's settings: each candidate's
 * net given those ranked above it. Exact and without weighing anything again: a marginal net is walk added
 * (weighted) minus ride saved, both differences of the same two served sets; the walk term is walk metres
 * times walk_weight / walk speed and nothing else depends on the walk weight (the ride and stopping terms
 * do not; see effectOf in src/model/scenario.ts), and the band tolerance changes no figure of a fixed list
 * at all. So at walk weight w' the marginal is (w'/w) x walk added - ride saved [D]. (test/audit/
 * robustness.test.ts checks it against the scenario engine's joint weighing of every prefix at w'.) The
 * same holds for a list weighed alone (candidates-weighed-alone): each figure is then its own net.
 */
export function programmeUnderCases(
  programme: Candidate[],
  params: ModelParams,
  settings: SensitivitySetting[] = sensitivitySettings(params),
): ProgrammeUnderCase[] {
  return settings.map((s) => {
    const scale = s.walkWeight / params.walk_weight;
    const marginal = programme.map((c) => (scale === 1 ? c.netPaxMinPerDay : scale * c.walkAddedPaxMinPerDay - c.rideSavedPaxMinPerDay));
    return { label: s.label, marginalNetPaxMinPerDay: marginal, netPaxMinPerDay: marginal.reduce((a, b) => a + b, 0) };
  });
}

/** Marks each candidate of the programme robust when its marginal net is a saving in every case; returns the cases' figures. */
export function judgeRobust(
  programme: Candidate[],
  params: ModelParams,
  settings: SensitivitySetting[] = sensitivitySettings(params),
): ProgrammeUnderCase[] {
  const cases = programmeUnderCases(programme, params, settings);
  programme.forEach((c, i) => (c.robust = cases.every((k) => k.marginalNetPaxMinPerDay[i] < 0)));
  return cases;
}

export function runSensitivity(
  feed: Feed,
  preps: PreparedPattern[],
  params: ModelParams,
  baseCandidates: Candidate[],
  {
    settings = sensitivitySettings(params),
    baseAnalyses,
    parts = preps.map((p) => patternParts(p, params, sensitivityWalkWeights(params))),
    reported = () => true,
    programme = baseCandidates,
    candidateOptions = {},
  }: {
    /** What the base candidates were built with besides the walking policy (the evidence for additions: context stations, land use). */
    candidateOptions?: Omit<CandidateOptions, 'maxGapM' | 'reviewGaps'>;
    /** The routes a report shows (--routes and the other filters): the case figures count their patterns and candidates only; every figure is still computed on the whole network. */
    reported?: (routeId: string) => boolean;
    settings?: SensitivitySetting[];
    /** The base audit's analysePattern results for preps (at params' own settings), from which baseCandidates were built. */
    baseAnalyses?: PatternAnalysis[];
    /** patternParts of each prep, shared with the base audit (computed here when not given). */
    parts?: PatternParts[];
    /** The programme as accepted (every route's), weighed again in each case; its candidates' `robust` is set here. */
    programme?: Candidate[];
  } = {},
): { cases: SensitivityCase[] } {
  const top = baseCandidates
    .filter((c) => c.routeIds.some(reported))
    .slice(0, SENSITIVITY_TOP_CANDIDATES)
    .map(candidateKey);
  const underCases = judgeRobust(programme, params, settings);
  const shownAt = programme.flatMap((c, i) => (c.routeIds.some(reported) ? [i] : []));
  const cases: SensitivityCase[] = [];
  settings.forEach((s, k) => {
    const isBase = baseAnalyses !== undefined && s.walkWeight === params.walk_weight && s.bandTolerance === params.band_tolerance;
    const analyses = isBase
      ? baseAnalyses
      : preps.map((p, i) =>
          analysePattern(feed, p, params, { walkWeight: s.walkWeight, bandTolerance: s.bandTolerance, parts: parts[i], detail: false }),
        );
    const cands = isBase ? baseCandidates : buildCandidates(feed, analyses, { ...candidateOptions, maxGapM: params.max_gap_m });
    const keys = new Set(cands.map(candidateKey));
    const shown = analyses.filter((a) => reported(a.result.routeId));
    const marginal = underCases[k].marginalNetPaxMinPerDay;
    cases.push({
      label: s.label,
      walkWeight: s.walkWeight,
      bandTolerance: s.bandTolerance,
      meanOptimalSpacingM: meanOptimalSpacingM(shown),
      closeStops: shown.reduce((n, a) => n + a.result.closeStops, 0),
      wideGaps: wideGapCounts(shown).distinct,
      paxMinLostPerDay: shown.reduce((n, a) => n + a.result.paxMinLostPerDay, 0),
      candidatesKept: top.filter((key) => keys.has(key)).length,
      programmeNetPaxMinPerDay: shownAt.reduce((x, i) => x + marginal[i], 0),
      programmeStillSaving: shownAt.filter((i) => marginal[i] < 0).length,
    });
  });
  return { cases };
}
