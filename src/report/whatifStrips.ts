// The stops of each pattern a scenario touches, before and after, laid out by distance along the route,
// for the what-if page's strip diagrams. The engine reports figures, not layouts; this places removed,
// moved and added stops again from the scenario (added and moved points snapped to the pattern's line of
// stops by nearestOnStopLine, as the engine places them), so the page can draw what the figures describe.

import type { Feed } from '../gtfs/types.js';
import type { PatternSet, Pattern } from '../network/types.js';
import { nearestOnStopLine } from '../network/nearestOnStopLine.js';
import { SNAP_LIMIT_M, type ScenarioInput, type ScenarioResult } from '../whatif/whatif.js';

export type StripChange = 'kept' | 'removed' | 'moved' | 'added';

export interface StripStop {
  posM: number;
  stopId: string; // '' for an added stop
  name: string;
  change: StripChange;
}

export interface WhatifStrip {
  patternId: string;
  routeLabel: string; // route_short_name, else route_id
  headsign: string;
  lengthM: number;
  before: StripStop[]; // every stop served today; removed and moved ones marked
  after: StripStop[]; // the stops served after the change
}

/** Distance along the pattern of the point of its line of stops nearest to (lat, lon), and the offset, metres. */
function snap(feed: Feed, pattern: Pattern, model: number[], lat: number, lon: number): { posM: number; offsetM: number } {
  const stops = model.map((j) => feed.stops[pattern.stopIdx[j]]);
  return nearestOnStopLine(
    stops.map((s) => s.lat),
    stops.map((s) => s.lon),
    model.map((j) => pattern.distAlongM[j]),
    lat,
    lon,
  );
}

function stopMatches(feed: Feed, stopIdx: number, ref: string): boolean {
  const s = feed.stops[stopIdx];
  return s.id === ref || s.name.trim().toLowerCase() === ref.trim().toLowerCase();
}

/** Before/after stop layouts of every pattern in the result, in the result's order. */
export function whatifStrips(feed: Feed, patterns: PatternSet, scenario: ScenarioInput, result: ScenarioResult): WhatifStrip[] {
  const byId = new Map(patterns.patterns.map((p) => [p.id, p]));
  const out: WhatifStrip[] = [];
  for (const e of result.patterns) {
    const pattern = byId.get(e.patternId);
    if (!pattern) continue;
    const model: number[] = [];
    for (let j = 0; j < pattern.stopIdx.length; j++) if (pattern.passengerStop[j] !== false) model.push(j);
    const removed = new Set(e.removedStopIds);
    const moved = new Set(e.movedStopIds);
    const before: StripStop[] = [];
    const after: StripStop[] = [];
    for (const j of model) {
      const s = feed.stops[pattern.stopIdx[j]];
      const posM = pattern.distAlongM[j];
      if (removed.has(s.id)) {
        before.push({ posM, stopId: s.id, name: s.name, change: 'removed' });
      } else if (moved.has(s.id)) {
        before.push({ posM, stopId: s.id, name: s.name, change: 'moved' });
        const m = (scenario.move ?? []).find((x) => stopMatches(feed, pattern.stopIdx[j], x.stop));
        const to = m ? snap(feed, pattern, model, m.lat, m.lon).posM : posM;
        after.push({ posM: to, stopId: s.id, name: s.name, change: 'moved' });
      } else {
        before.push({ posM, stopId: s.id, name: s.name, change: 'kept' });
        after.push({ posM, stopId: s.id, name: s.name, change: 'kept' });
      }
    }
    if (e.addedCount > 0) {
      const first = pattern.distAlongM[model[0]];
      const last = pattern.distAlongM[model[model.length - 1]];
      for (const a of scenario.add ?? []) {
        if (a.route && a.route !== pattern.routeId) continue;
        if (a.patterns && !a.patterns.includes(pattern.id)) continue;
        const p = snap(feed, pattern, model, a.lat, a.lon);
        if (p.offsetM > SNAP_LIMIT_M || !(p.posM > first && p.posM < last)) continue;
        after.push({ posM: p.posM, stopId: '', name: a.name ?? 'new stop', change: 'added' });
      }
    }
    after.sort((x, y) => x.posM - y.posM);
    const route = feed.routes.get(pattern.routeId);
    out.push({
      patternId: pattern.id,
      routeLabel: route?.shortName || pattern.routeId,
      headsign: pattern.headsign,
      lengthM: pattern.lengthM,
      before,
      after,
    });
  }
  return out;
}
