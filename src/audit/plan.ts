// The optimiser's plan written out: on each pattern the stops the optimiser keeps and drops (stops.csv's
// optimiser_keeps), the whole network's drops as a scenario (plan.json) that `stopspan whatif --scenario`
// reads back unchanged, and the plan's joint figures weighed by the what-if engine on the audit's own
// preparation, so the summary's plan figures are what whatif gives for the file.

import type { Feed } from '../gtfs/types.js';
import type { ModelParams } from '../model/params.js';
import type { PreparedPattern } from '../model/preparePattern.js';
import type { NetworkPlan, StopResult } from './types.js';
import { weighScenario, type ScenarioInput } from '../model/scenario.js';

export type { NetworkPlan };

/** The plan from the stops the optimiser drops (keptByOptimiser false); null when it keeps every stop. */
export function optimiserPlan(
  feed: Feed,
  date: string,
  preps: PreparedPattern[],
  params: ModelParams,
  stops: StopResult[],
): NetworkPlan | null {
  const byStop = new Map<string, Set<string>>();
  let drops = 0;
  for (const s of stops) {
    if (s.keptByOptimiser) continue;
    let set = byStop.get(s.stopId);
    if (!set) byStop.set(s.stopId, (set = new Set()));
    if (!set.has(s.patternId)) drops++;
    set.add(s.patternId);
  }
  if (byStop.size === 0) return null;
  const remove = [...byStop.entries()]
    .sort((a, b) => a[0].localeCompare(b[0]))
    .map(([stop, pats]) => ({ stop, patterns: [...pats].sort() }));
  const scenario: ScenarioInput = { remove };
  const figures = weighScenario(feed, date, preps, params, scenario);
  return {
    scenario,
    stopsDropped: byStop.size,
    dropsOnPatterns: drops,
    patternsChanged: new Set(stops.filter((s) => !s.keptByOptimiser).map((s) => s.patternId)).size,
    figures,
  };
}
