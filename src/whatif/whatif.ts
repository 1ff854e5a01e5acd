// The what-if product: a proposal weighed on a whole feed. It prepares the network as the audit does
// (src/audit/prepareAudit.ts) and weighs the scenario with the model's scenario engine
// (src/model/scenario.ts), adding the parameters, assumptions and cautions a reader needs.

import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from '../network/types.js';
import { paramsReport } from '../model/params.js';
import { parseScenario, weighScenario, SNAP_LIMIT_M, type ScenarioInput, type ScenarioResult } from '../model/scenario.js';
import { prepareAudit, type PrepareAuditOptions } from '../audit/prepareAudit.js';
import { CAUTIONS } from '../audit/cautions.js';
import { coveredAfter } from '../model/catchments.js';
import { WALK_DETOUR, WALK_RADIUS_M } from '../model/walkReach.js';

export * from '../model/scenario.js';

export interface EvaluateScenarioOptions extends PrepareAuditOptions {}

/** Weighs a scenario on every pattern it touches; throws 'bad-scenario' before computing if any item is not understood. */
export function evaluateScenario(
  feed: Feed,
  patterns: PatternSet,
  scenario: ScenarioInput,
  options: EvaluateScenarioOptions = {},
): ScenarioResult {
  const sc = parseScenario(scenario);
  const { np, params, preps, warnings, catchments } = prepareAudit(feed, patterns, options);
  const weighed = weighScenario(feed, patterns.date, preps, params, sc);
  const assumed = weighed.patterns.some((e) => e.demandSource !== 'observed');
  let landUse: ScenarioResult['landUse'] = null;
  if (catchments) {
    // a stop closes when every pattern serving it drops it (removed or moved away); added and moved stops open
    const dropped = new Map<string, Set<string>>(); // stop_id -> patterns dropping it
    for (const e of weighed.patterns) {
      for (const id of [...e.removedStopIds, ...e.movedStopIds]) {
        let set = dropped.get(id);
        if (!set) dropped.set(id, (set = new Set()));
        set.add(e.patternId);
      }
    }
    const closed = new Set<number>();
    for (const [id, pats] of dropped) {
      const s = feed.stopIndex.get(id);
      if (s === undefined) continue;
      if (preps.every((p) => !p.pattern.stopIdx.some((x, j) => x === s && p.modelStops.includes(j)) || pats.has(p.pattern.id)))
        closed.add(s);
    }
    const opened = [
      ...(sc.add ?? []).map((a) => ({ lat: a.lat, lon: a.lon })),
      ...(sc.move ?? []).map((m) => ({ lat: m.lat, lon: m.lon })),
    ];
    landUse = {
      file: catchments.layer.file,
      people: catchments.layer.totalPeople,
      peopleCoveredBefore: catchments.coveredPeople,
      peopleCoveredAfter: coveredAfter(catchments, closed, opened),
      stopsClosed: [...closed].map((s) => feed.stops[s].id).sort(),
    };
  }
  return {
    date: patterns.date,
    walkWeight: params.walk_weight,
    walkSpeedMps: params.walk_speed_mps,
    maxGapM: params.max_gap_m,
    ...weighed,
    params: paramsReport(np),
    assumptions: [
      assumed
        ? catchments
          ? "No ridership file: the assumed riders' trip ends follow the land-use layer's people in each stop's catchment: figures marked demand_source=land-use."
          : 'Some or all demand is assumed uniform along the pattern (no ridership file for it): figures marked demand_source=assumed.'
        : 'Demand comes from the ridership file.',
      ...(catchments
        ? [
            `Coverage: people in the land-use layer within a ${WALK_RADIUS_M} m walk (straight line times ${WALK_DETOUR}) of a stop served, before and after the change; a stop closes when no pattern serves it any more.`,
          ]
        : []),
      "Riders are spread evenly over each stop's catchment and walk along the route to the nearest stop served after the change; in-vehicle time between stops is not changed.",
      `Added and moved stops are placed on the line between the pattern's stops nearest to the given point (at most ${SNAP_LIMIT_M} m away).`,
      "The band tolerance does not enter a scenario's figures; sensitivity shows the net at walk weights 1.5 and 2.5.",
      "Fleet: a route's round trip is its scheduled run time out and back (no layover); peak vehicles = round trip / peak headway, rounded up; the same fleet on the shorter round trip could run round trip / vehicles; waiting saved = half the headway change per boarding (common planning practice; an upper estimate where headways are long enough that riders time their arrival), at the day's mean headway.",
    ],
    cautions: [...CAUTIONS],
    warnings: [...feed.warnings, ...warnings.list()],
    landUse,
  };
}
