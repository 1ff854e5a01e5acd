// The headline's two network figures that a plain sum over patterns would get wrong or leave out: wide
// gaps counted once per distinct pair of stops (a gap that five routes run along one avenue is one gap a
// planner can fill, not five), with the per-pattern count beside it; and what the proposed additions have
// at stake on each pattern, weighed together there by the scenario engine, so the headline's
// passenger-minutes hold additions as well as the optimiser's removals.

import type { Feed } from '../gtfs/types.js';
import type { ModelParams } from '../model/params.js';
import type { PreparedPattern } from '../model/preparePattern.js';
import { effectOf, resolveChanges, type PatternEdit } from '../model/scenario.js';
import type { Candidate } from './types.js';
import type { PatternAnalysis } from './verdicts.js';
import { candidateScenario } from './programme.js';

/** Wide gaps: distinct (from stop, to stop) pairs over the patterns given, and the same gaps counted on each pattern. */
export function wideGapCounts(analyses: PatternAnalysis[]): { distinct: number; onPatterns: number } {
  const pairs = new Set<string>();
  let onPatterns = 0;
  for (const a of analyses) {
    // analysePattern lists one addition per wide gap, detail or not
    for (const e of a.additions) pairs.add(`${e.fromStopIdx}>${e.toStopIdx}`);
    onPatterns += a.result.wideGaps;
  }
  return { distinct: pairs.size, onPatterns };
}

/**
 * Per pattern id, the passenger-minutes a day the candidate additions save its riders (positive = saved),
 * all the additions on the pattern weighed together, at the base walk weight.
 */
export function additionsAtStake(
  feed: Feed,
  date: string,
  preps: PreparedPattern[],
  params: ModelParams,
  candidates: Candidate[],
): Map<string, number> {
  const edits = new Map<string, PatternEdit>();
  for (const c of candidates) {
    if (c.action !== 'add') continue;
    let one: Map<string, PatternEdit>;
    try {
      one = resolveChanges(feed, date, preps, candidateScenario(c));
    } catch {
      continue; // as the programme does: a candidate the engine cannot place stays out
    }
    for (const [pid, e] of one) {
      const prev = edits.get(pid);
      edits.set(pid, prev ? { ...prev, added: [...prev.added, ...e.added] } : e);
    }
  }
  const out = new Map<string, number>();
  for (const [pid, e] of edits) out.set(pid, -effectOf(feed, e, params, params.walk_weight).netPaxMinPerDay);
  return out;
}
