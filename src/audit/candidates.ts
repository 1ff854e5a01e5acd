// Network-level candidates: a stop served by several patterns is one decision, so its removal effects are
// summed over every pattern that serves it; a stop fixed on any pattern is not a candidate. Additions in
// wide gaps are grouped by the pair of stops around the gap. Ranked by net passenger-minutes per day,
// most negative (largest saving) first. A removal that would open a gap above the walking policy, alone or
// together with a removal already proposed next to it, is not proposed.

import type { Feed } from '../gtfs/types.js';
import type { Candidate, ReviewGap } from './types.js';
import type { AdditionEffect, PatternAnalysis, RemovalEffect } from './verdicts.js';
import { additionEvidence, buildStopIndex } from './additionEvidence.js';
import type { StationPoint } from '../network/contextStations.js';

export interface CandidateOptions {
  maxGapM: number;
  /** Filled with the wide gaps that have no evidence for a stop (see additionEvidence.ts), longest first. */
  reviewGaps?: ReviewGap[];
  /** The context feeds' stations (--context): evidence for an addition, as another route's stop is. */
  contextStations?: readonly StationPoint[];
  /** With a land-use layer: the people a new stop at a place would serve (src/model/catchments.ts peopleForNewStop), the evidence for an addition. */
  peopleNear?: (lat: number, lon: number) => { people: number; newlyCovered: number };
  /** With a land-use layer: the people within a walk of a feed stop and of no other stop served. */
  onlyStopPeople?: (stopIdx: number) => number;
}

interface Group<T> {
  key: string;
  effects: T[];
  net: number;
}

function sum<T>(items: T[], f: (t: T) => number): number {
  let s = 0;
  for (const t of items) s += f(t);
  return s;
}

/** A stable key for matching a candidate across sensitivity cases. */
export function candidateKey(c: Pick<Candidate, 'action' | 'stopId' | 'lat' | 'lon'>): string {
  return c.action === 'remove' ? `remove:${c.stopId}` : `add:${c.lat.toFixed(6)},${c.lon.toFixed(6)}`;
}

export function buildCandidates(
  feed: Feed,
  analyses: PatternAnalysis[],
  { maxGapM, reviewGaps, contextStations = [], peopleNear, onlyStopPeople }: CandidateOptions,
): Candidate[] {
  const fixed = new Set<number>();
  for (const a of analyses) for (const s of a.fixedStopIdx) fixed.add(s);
  const byPattern = new Map(analyses.map((a) => [a.result.patternId, a]));

  // removals, one decision per feed stop
  const removalGroups = new Map<number, Group<RemovalEffect>>();
  for (const a of analyses) {
    for (const r of a.removals) {
      let g = removalGroups.get(r.stopIdx);
      if (!g) removalGroups.set(r.stopIdx, (g = { key: String(r.stopIdx), effects: [], net: 0 }));
      g.effects.push(r);
      g.net += r.netPaxMinPerDay;
    }
  }
  const removalOrder = [...removalGroups.entries()]
    .filter(([stopIdx, g]) => !fixed.has(stopIdx) && g.net < 0 && g.effects.every((e) => e.gapAfterRemovalM <= maxGapM))
    .sort((x, y) => x[1].net - y[1].net || x[0] - y[0]);

  // keep removals that together with those already accepted never open a gap above the policy
  const removed = new Map<string, Set<number>>(); // pattern -> model positions accepted for removal
  const accepted: [number, Group<RemovalEffect>][] = [];
  for (const entry of removalOrder) {
    const ok = entry[1].effects.every((e) => {
      const set = removed.get(e.patternId);
      if (!set) return true;
      const a = byPattern.get(e.patternId)!;
      const posM = a.modelPosM;
      let lo = e.modelPos - 1;
      while (lo > 0 && set.has(lo)) lo--;
      let hi = e.modelPos + 1;
      while (hi < posM.length - 1 && set.has(hi)) hi++;
      return posM[hi] - posM[lo] <= maxGapM;
    });
    if (!ok) continue;
    accepted.push(entry);
    for (const e of entry[1].effects) {
      let set = removed.get(e.patternId);
      if (!set) removed.set(e.patternId, (set = new Set()));
      set.add(e.modelPos);
    }
  }

  const out: Candidate[] = [];
  for (const [stopIdx, g] of accepted) {
    const stop = feed.stops[stopIdx];
    const c = toCandidate('remove', stop?.id ?? '', stop?.name ?? '', stop?.lat ?? NaN, stop?.lon ?? NaN, g.effects, {
      fromStopId: '',
      toStopId: '',
      gapM: null,
    });
    if (onlyStopPeople) c.peopleUncovered = onlyStopPeople(stopIdx);
    out.push(c);
  }

  // additions, one decision per pair of stops around a wide gap
  const addGroups = new Map<string, Group<AdditionEffect>>();
  for (const a of analyses) {
    for (const e of a.additions) {
      const key = `${e.fromStopIdx}>${e.toStopIdx}`;
      let g = addGroups.get(key);
      if (!g) addGroups.set(key, (g = { key, effects: [], net: 0 }));
      g.effects.push(e);
      g.net += e.netPaxMinPerDay;
    }
  }
  // an addition stands on evidence that people are there and a bus can stop there; a gap without it is
  // listed for review with its length and reason, with no passenger-minute figure
  const stopIndex = addGroups.size ? buildStopIndex(feed, servedStops(analyses), contextStations) : null;
  const review: ReviewGap[] = [];
  for (const g of addGroups.values()) {
    const e0 = g.effects[0];
    const from = feed.stops[e0.fromStopIdx];
    const to = feed.stops[e0.toStopIdx];
    const name = `between ${from?.name ?? '?'} and ${to?.name ?? '?'}`;
    // the fastest schedule over the gap speaks for the stretch: an express run is what a bridge allows
    let scheduledS: number | null = null;
    for (const e of g.effects)
      if (e.scheduledS !== null && e.scheduledS > 0 && (scheduledS === null || e.scheduledS < scheduledS)) scheduledS = e.scheduledS;
    const ev = additionEvidence(
      feed,
      stopIndex!,
      {
        lat: e0.lat,
        lon: e0.lon,
        fromStopIdx: e0.fromStopIdx,
        toStopIdx: e0.toStopIdx,
        gapM: e0.gapM,
        scheduledS,
        ownRoutes: new Set(g.effects.map((e) => e.routeId)),
      },
      peopleNear?.(e0.lat, e0.lon),
    );
    if (!ev.ok) {
      review.push({
        fromStopId: from?.id ?? '',
        toStopId: to?.id ?? '',
        name,
        lat: e0.lat,
        lon: e0.lon,
        gapM: e0.gapM,
        routeIds: [...new Set(g.effects.map((e) => e.routeId))].sort(),
        patternIds: g.effects.map((e) => e.patternId),
        reason: ev.reason,
        detail: ev.text,
      });
      continue;
    }
    if (!(g.net < 0)) continue;
    const c = toCandidate('add', '', name, e0.lat, e0.lon, g.effects, {
      fromStopId: from?.id ?? '',
      toStopId: to?.id ?? '',
      gapM: e0.gapM,
    });
    c.evidence = ev.text;
    out.push(c);
  }
  if (reviewGaps) {
    review.sort((x, y) => y.gapM - x.gapM || x.name.localeCompare(y.name));
    reviewGaps.push(...review);
  }

  out.sort((x, y) => x.netPaxMinPerDay - y.netPaxMinPerDay || (x.stopId + x.stopName).localeCompare(y.stopId + y.stopName));
  out.forEach((c, i) => (c.rank = i + 1));
  return out;
}

function toCandidate(
  action: 'remove' | 'add',
  stopId: string,
  stopName: string,
  lat: number,
  lon: number,
  effects: (RemovalEffect | AdditionEffect)[],
  between: Pick<Candidate, 'fromStopId' | 'toStopId' | 'gapM'>,
): Candidate {
  const trips = sum(effects, (e) => e.tripsPerDay);
  const busSPerDay = sum(effects, (e) => e.runTimeSavedPerTripS * e.tripsPerDay);
  return {
    rank: 0,
    action,
    stopId,
    stopName,
    lat,
    lon,
    routeIds: [...new Set(effects.map((e) => e.routeId))].sort(),
    patternIds: effects.map((e) => e.patternId),
    netPaxMinPerDay: sum(effects, (e) => e.netPaxMinPerDay),
    ridersAffectedPerDay: sum(effects, (e) => e.ridersAffectedPerDay),
    walkAddedPaxMinPerDay: sum(effects, (e) => e.walkAddedPaxMinPerDay),
    rideSavedPaxMinPerDay: sum(effects, (e) => e.rideSavedPaxMinPerDay),
    runTimeSavedPerTripS: trips > 0 ? busSPerDay / trips : 0,
    vehicleHoursPerDay: busSPerDay / 3600,
    robust: false,
    evidence: '',
    ...between,
  };
}

/** (feed stop, route) for every passenger stop the audited patterns serve. */
function* servedStops(analyses: PatternAnalysis[]): Iterable<[number, string]> {
  for (const a of analyses) for (const s of a.feedStopsByModelPos) yield [s, a.result.routeId];
}
