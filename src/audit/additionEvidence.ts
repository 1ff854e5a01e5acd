// The evidence rule for additions. A proposed stop in a wide gap is a claim that people are there and that
// a bus can stop there. Without a land-use layer the audit's only witnesses are the networks it reads: a
// stop of any route near the proposed site (other than the gap's own ends) says the street is walked to;
// a schedule that runs the stretch faster than a local bus on streets, or a long straight run with no stop
// of any route near its middle, says it is a bridge, an expressway, an airfield or a park. A gap without
// evidence is not an addition: it is listed as a wide gap to review, with its length and the reason, and
// no passenger-minute figure. The rule and its thresholds are design choices of this tool [D]:
//   - walking distance: 400 m walked [M, common practice: a quarter mile / 400 m is the usual bus-stop
//     catchment] at a detour factor of 1.3 [M, common practice for street grids: network distance is about
//     1.2-1.4 times the straight line], so a straight line of about 308 m;
//   - a witness stop must stand in the middle of the gap: at most half as far from the site as from either
//     end, so the stops clustered at the ends (the gap's own, the other direction's, a crossing route's at
//     the same corner, a parallel street's along a park's edge) say nothing about the middle; and it must serve a route other than the gap's own, whose stops say where that route
//     runs (a loop round an island of institutions), not that people are there;
//   - a stretch scheduled faster than 50 km/h on average is not a street a local bus stops on: a bus that
//     stops at both ends cannot average an urban 50 km/h limit once braking and accelerating are counted [D];
//   - a run of at least 1 km whose stops' straight line is within 5 % of the distance along is "long and
//     straight" (named so in the reason; it fails on the witness rule like any other).
// A station of a context feed (--context: the subway, regional rail) within the same walk of the site, and
// in the middle of the gap by the same rule, is a witness too: people walk to it; the evidence names it.
// With a land-use layer the people are the witness: an addition needs at least MIN_PEOPLE_FOR_ADDITION (50)
// people, residents and jobs as weighted, within a walk of the site and nearer to it than to any stop
// served today; the fast-stretch rule stands either way.

import type { Feed } from '../gtfs/types.js';
import { haversineM } from '../network/geodesy.js';
import { WALK_RADIUS_M, WALK_REACH_M } from '../model/walkReach.js';
import { PointGrid } from '../landuse/pointGrid.js';
import { stationNote, type StationPoint } from '../network/contextStations.js';

export { WALK_RADIUS_M, WALK_DETOUR, WALK_REACH_M } from '../model/walkReach.js';
/** Scheduled speed over a gap above which it is not a street a local bus stops on, m/s (50 km/h) [D]. */
export const FAST_STRETCH_MPS = 50 / 3.6;
/** A gap at least this long whose ends' straight line is this close to its length is long and straight. */
export const STRAIGHT_MIN_M = 1000;
export const STRAIGHT_RATIO = 0.95;
/** A witness stands at most this share as far from the site as from either end of the gap. */
export const WITNESS_END_RATIO = 0.7;
/** How many witness stops an addition needs. */
export const MIN_WITNESS_STOPS = 1;

/** With a land-use layer, the people (weighted) who would walk to a new stop first that it needs [D]. */
export const MIN_PEOPLE_FOR_ADDITION = 50;

export type ReviewReason = 'fast-stretch' | 'long-straight-empty' | 'no-stop-near' | 'no-people-near';

export interface GapSite {
  lat: number;
  lon: number;
  fromStopIdx: number;
  toStopIdx: number;
  gapM: number;
  /** Scheduled seconds over the gap (median trip), or null when the schedule does not say. */
  scheduledS: number | null;
  /** The routes whose gap this is: their own stops witness where they run, not where people are. */
  ownRoutes: Set<string>;
}

export type Evidence =
  | { ok: true; witnessStops: number; witnessRoutes: string[]; witnessStations?: string[]; text: string }
  | { ok: false; reason: ReviewReason; text: string };

/** The stops served on the analysis date on a grid (src/landuse/pointGrid.ts), with the routes serving each. */
export interface StopIndex {
  grid: PointGrid;
  routesAt: Map<number, Set<string>>;
  /** The context feeds' stations (none without --context), and a grid of them by position in that list. */
  stations: readonly StationPoint[];
  stationGrid: PointGrid;
}

export function buildStopIndex(feed: Feed, served: Iterable<[number, string]>, stations: readonly StationPoint[] = []): StopIndex {
  const routesAt = new Map<number, Set<string>>();
  for (const [s, routeId] of served) {
    let r = routesAt.get(s);
    if (!r) routesAt.set(s, (r = new Set()));
    r.add(routeId);
  }
  const grid = new PointGrid(
    feed.stops.map((st) => st.lat),
    feed.stops.map((st) => st.lon),
    routesAt.keys(),
  );
  const stationGrid = new PointGrid(
    stations.map((p) => p.lat),
    stations.map((p) => p.lon),
  );
  return { grid, routesAt, stations, stationGrid };
}

/** Stops of the index within reachM of a point (straight line), in index order. */
export function stopsNear(feed: Feed, index: StopIndex, lat: number, lon: number, reachM: number): number[] {
  const out: number[] = [];
  index.grid.near(lat, lon, reachM, (s) => out.push(s));
  return out.sort((a, b) => a - b);
}

/**
 * The evidence for a stop at a gap's site, or the reason it is a gap to review. With a land-use layer
 * (`people`: those who would walk to the site first, src/model/catchments.ts peopleForNewStop) the map is
 * the witness instead of the other routes' stops: at least MIN_PEOPLE_FOR_ADDITION people.
 */
export function additionEvidence(feed: Feed, index: StopIndex, site: GapSite, people?: { people: number; newlyCovered: number }): Evidence {
  const from = feed.stops[site.fromStopIdx];
  const to = feed.stops[site.toStopIdx];
  if (site.scheduledS !== null && site.scheduledS > 0) {
    const mps = site.gapM / site.scheduledS;
    if (mps > FAST_STRETCH_MPS)
      return { ok: false, reason: 'fast-stretch', text: `scheduled at ${(mps * 3.6).toFixed(0)} km/h, faster than a local bus on streets` };
  }
  if (people) {
    const n = Math.round(people.people);
    if (people.people >= MIN_PEOPLE_FOR_ADDITION) {
      return {
        ok: true,
        witnessStops: 0,
        witnessRoutes: [],
        text: `${n} people (land use) within a ${WALK_RADIUS_M} m walk would have it as their nearest stop, ${Math.round(people.newlyCovered)} of them beyond every stop's walk today`,
      };
    }
    return {
      ok: false,
      reason: 'no-people-near',
      text: `${n} people (land use) within a ${WALK_RADIUS_M} m walk would have it as their nearest stop, fewer than ${MIN_PEOPLE_FOR_ADDITION}`,
    };
  }
  const witnesses: number[] = [];
  const routes = new Set<string>();
  for (const s of stopsNear(feed, index, site.lat, site.lon, WALK_REACH_M)) {
    if (s === site.fromStopIdx || s === site.toStopIdx) continue;
    const st = feed.stops[s];
    const dSite = haversineM(site.lat, site.lon, st.lat, st.lon);
    if (from && !(dSite <= WITNESS_END_RATIO * haversineM(from.lat, from.lon, st.lat, st.lon))) continue;
    if (to && !(dSite <= WITNESS_END_RATIO * haversineM(to.lat, to.lon, st.lat, st.lon))) continue;
    const others = [...(index.routesAt.get(s) ?? [])].filter((r) => !site.ownRoutes.has(r));
    if (others.length === 0) continue;
    witnesses.push(s);
    for (const r of others) routes.add(r);
  }
  // context stations in the middle of the gap, nearest first
  const stations: { d: number; note: string }[] = [];
  index.stationGrid.near(site.lat, site.lon, WALK_REACH_M, (i, dSite) => {
    const p = index.stations[i];
    if (from && !(dSite <= WITNESS_END_RATIO * haversineM(from.lat, from.lon, p.lat, p.lon))) return;
    if (to && !(dSite <= WITNESS_END_RATIO * haversineM(to.lat, to.lon, p.lat, p.lon))) return;
    stations.push({ d: dSite, note: stationNote(p, dSite) });
  });
  stations.sort((a, b) => a.d - b.d || a.note.localeCompare(b.note));
  if (witnesses.length + stations.length >= MIN_WITNESS_STOPS) {
    const rs = [...routes].sort();
    const said: string[] = [];
    if (witnesses.length)
      said.push(
        `${witnesses.length} stop${witnesses.length === 1 ? '' : 's'} of route${rs.length === 1 ? '' : 's'} ${rs.join(' ')} within a walk of the site`,
      );
    if (stations.length) said.push(`${stations.map((x) => x.note).join('; ')} from the site, within a walk`);
    return {
      ok: true,
      witnessStops: witnesses.length,
      witnessRoutes: rs,
      ...(stations.length ? { witnessStations: stations.map((x) => x.note) } : {}),
      text: said.join('; '),
    };
  }
  const nothing = index.stations.length > 0 ? 'no stop of another route nor station of a context feed' : 'no stop of another route';
  const chordM = from && to ? haversineM(from.lat, from.lon, to.lat, to.lon) : 0;
  if (site.gapM >= STRAIGHT_MIN_M && chordM >= STRAIGHT_RATIO * site.gapM)
    return {
      ok: false,
      reason: 'long-straight-empty',
      text: `${(site.gapM / 1000).toFixed(1)} km straight with ${nothing} within a ${WALK_RADIUS_M} m walk of its middle`,
    };
  return {
    ok: false,
    reason: 'no-stop-near',
    text: `${nothing} within a ${WALK_RADIUS_M} m walk of its middle, away from the gap's ends`,
  };
}
