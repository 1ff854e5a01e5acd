// The scenario engine: a concrete proposal (remove, add or move stops) checked against a feed and weighed on
// patterns prepared by the model. It lives with the model because the audit weighs its own plan and its
// candidate programme with it, and the what-if product (src/whatif) wraps it for a whole feed.
//
// The what-if engine: a concrete proposal (remove stops, add stops at coordinates, move stops) weighed
// pattern by pattern on the same corridor cost as the audit: who walks farther and who walks less, the
// ride time saved for riders on board, the neighbours' changed stopping, the net in passenger-minutes per
// day, run time and vehicle-hours, the largest gap against the walking policy and the share of the route
// within the policy's walk of a stop, before and after, and the net again at the sensitivity walk weights.
// A scenario is checked whole before anything is computed: an unknown or ambiguous stop, a terminal, a
// coordinate far from the named route, or an unknown key is a 'bad-scenario' error naming the item.

import { parseDecimal } from '../common/decimal.js';
import { readJsonFile } from '../common/readJsonFile.js';
import { nearestNames } from '../common/editDistance.js';
import { StopspanError } from '../common/errors.js';
import type { FeedWarning } from '../common/warnings.js';
import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from '../network/types.js';
import { nearestOnStopLine } from '../network/nearestOnStopLine.js';
import type { DemandSource, ParamsReport } from './types.js';
import { type Corridor, type CostSettings, servedStopCost } from './corridor.js';
import { paramsReport, type ModelParams } from './params.js';
import { costSettings, type PreparedPattern } from './preparePattern.js';
import { routeFleet, type RouteFleet } from './fleet.js';

/** A scenario as written in a scenario file (every key optional; unknown keys are refused). */
export interface ScenarioInput {
  remove?: (string | ({ stop: string } & StopFilter))[];
  add?: { lat: number; lon: number; route?: string; name?: string; patterns?: string[] }[];
  move?: ({ stop: string; lat: number; lon: number } & StopFilter)[];
}

/**
 * Which patterns a stop named in a scenario is meant on: routes (route_id or short name), a direction_id,
 * a headsign; both_directions takes every stop of that name the filter leaves (the kerb on each side).
 */
export interface StopFilter {
  patterns?: string[]; // pattern ids, as the audit names them (a plan drops a stop on some patterns only)
  routes?: string[];
  direction?: number;
  headsign?: string;
  both_directions?: boolean;
}

/** One stop a scenario changes on one pattern, and the gap it leaves against the walking policy. */
export interface StopChange {
  action: 'remove' | 'move' | 'add';
  stopId: string; // '' for an added stop
  stopName: string;
  gapsBeforeM: number[]; // the spacing around the place today (a removed stop's two gaps, or the gap a new stop splits)
  gapsAfterM: number[]; // the spacing around it after the change
  overPolicy: boolean; // a gap after the change is above max_gap_m and longer than any gap there before
  /** A removed or moved stop within walking distance of a context feed's station (--context): "station X (feed), 60 m"; else ''. */
  nearStation: string;
}

/**
 * The stops a scenario removes or moves that lie within walking distance of a context feed's station, once
 * each (a stop on several patterns is one line), for the renderers' warning: the audit keeps such a stop as a
 * transfer point to another mode.
 */
export function changesNearStations(
  result: Pick<ScenarioResult, 'patterns'>,
): { stopId: string; stopName: string; action: StopChange['action']; nearStation: string }[] {
  const out = new Map<string, { stopId: string; stopName: string; action: StopChange['action']; nearStation: string }>();
  for (const e of result.patterns) {
    for (const c of e.changes)
      if (c.nearStation && !out.has(c.stopId))
        out.set(c.stopId, { stopId: c.stopId, stopName: c.stopName, action: c.action, nearStation: c.nearStation });
  }
  return [...out.values()];
}

/** How far (metres) an added or moved stop may lie from the pattern's line of stops. */
export const SNAP_LIMIT_M = 200;

export interface ScenarioPatternEffect {
  patternId: string;
  routeId: string;
  tripsPerDay: number;
  demandSource: DemandSource;
  removedStopIds: string[];
  movedStopIds: string[];
  addedCount: number;
  changes: StopChange[];
  ridersAffectedPerDay: number; // riders whose stop changes
  walkAddedMinPerDay: number; // real minutes walked further, summed over riders (not weighted)
  walkAddedPaxMinPerDay: number; // the same weighted by walk_weight (as every pax-min figure)
  walkAddedPerRiderM: number; // walked further per rider whose stop changes, metres (0 when none walks further)
  walkAddedPerRiderS: number;
  walkSavedPaxMinPerDay: number;
  rideSavedPaxMinPerDay: number; // riders on board, at the stops no longer served (minus new stops' delay)
  neighboursExtraPaxMinPerDay: number; // change in delay at the stops kept (their stopping changes)
  netPaxMinPerDay: number; // walk added - walk saved - ride saved + neighbours' extra; negative = saving
  runTimeSavedPerTripS: number;
  vehicleHoursPerDay: number; // saved (positive) or added (negative)
  largestGapBeforeM: number;
  largestGapAfterM: number;
  coverageBefore: number; // share of the pattern's length within max_gap_m/2 of a stop
  coverageAfter: number;
}

export type ScenarioTotals = Omit<
  ScenarioPatternEffect,
  | 'patternId'
  | 'routeId'
  | 'tripsPerDay'
  | 'demandSource'
  | 'removedStopIds'
  | 'movedStopIds'
  | 'addedCount'
  | 'changes'
  | 'coverageBefore'
  | 'coverageAfter'
> & { patternsAffected: number; overPolicyAfter: number };

export interface ScenarioSensitivity {
  label: string;
  walkWeight: number;
  netPaxMinPerDay: number;
}

export interface ScenarioResult {
  date: string;
  walkWeight: number; // the weight on walking time in every pax-min figure
  walkSpeedMps: number;
  maxGapM: number; // the walking policy's largest gap
  patterns: ScenarioPatternEffect[];
  totals: ScenarioTotals;
  sensitivity: ScenarioSensitivity[];
  fleet: RouteFleet[]; // per route touched: round trip saved, peak vehicles, the same fleet's headway, waiting
  params: ParamsReport;
  assumptions: string[];
  cautions: string[];
  warnings: FeedWarning[];
  /** With a land-use layer: people (weighted) within a walk of a stop served, before and after the change. */
  landUse?: LandUseCoverage | null;
}

/** A scenario's effect on land-use coverage (people as weighted by the layer's columns). */
export interface LandUseCoverage {
  file: string;
  people: number;
  peopleCoveredBefore: number;
  peopleCoveredAfter: number;
  /** Stops no pattern serves after the change. */
  stopsClosed: string[];
}

const KNOWN_KEYS = ['remove', 'add', 'move'];

function bad(message: string, value?: string, file?: string): StopspanError {
  return new StopspanError('bad-scenario', message, { file, value });
}

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

function num(x: unknown, what: string, file?: string): number {
  const n = typeof x === 'string' ? (parseDecimal(x) ?? x) : x;
  if (typeof n !== 'number' || !Number.isFinite(n)) throw bad(`invalid ${what}: expected a number`, String(x), file);
  return n;
}

function latLon(lat: unknown, lon: unknown, where: string, file?: string): { lat: number; lon: number } {
  const la = num(lat, `${where} lat`, file);
  const lo = num(lon, `${where} lon`, file);
  if (la < -90 || la > 90 || lo < -180 || lo > 180) throw bad(`invalid ${where}: coordinates out of range`, `${la},${lo}`, file);
  return { lat: la, lon: lo };
}

const FILTER_KEYS = ['patterns', 'routes', 'direction', 'headsign', 'both_directions'];

/** The filter keys of a remove or move item, checked; only the keys given are returned. */
function parseFilter(r: Record<string, unknown>, where: string, file?: string): StopFilter {
  const out: StopFilter = {};
  if (r.routes !== undefined) {
    if (!Array.isArray(r.routes) || r.routes.some((x) => typeof x !== 'string'))
      throw bad(`invalid scenario ${where}.routes: expected a list of route ids`, JSON.stringify(r.routes), file);
    out.routes = r.routes as string[];
  }
  if (r.patterns !== undefined) {
    if (!Array.isArray(r.patterns) || r.patterns.some((x) => typeof x !== 'string'))
      throw bad(`invalid scenario ${where}.patterns: expected a list of pattern ids`, JSON.stringify(r.patterns), file);
    out.patterns = r.patterns as string[];
  }
  if (r.direction !== undefined) {
    const d = typeof r.direction === 'string' ? Number(r.direction) : r.direction;
    if (d !== 0 && d !== 1)
      throw bad(`invalid scenario ${where}.direction: expected direction_id 0 or 1`, JSON.stringify(r.direction), file);
    out.direction = d;
  }
  if (r.headsign !== undefined) {
    if (typeof r.headsign !== 'string' || r.headsign.trim() === '')
      throw bad(`invalid scenario ${where}.headsign: expected text`, JSON.stringify(r.headsign), file);
    out.headsign = r.headsign;
  }
  if (r.both_directions !== undefined) {
    if (typeof r.both_directions !== 'boolean')
      throw bad(`invalid scenario ${where}.both_directions: expected true or false`, JSON.stringify(r.both_directions), file);
    out.both_directions = r.both_directions;
  }
  return out;
}

/** Checks a scenario object (from a file or built from options); unknown keys are errors. */
export function parseScenario(input: unknown, { file }: { file?: string } = {}): ScenarioInput {
  if (!isObject(input)) throw bad('invalid scenario: expected an object with remove, add and/or move', undefined, file);
  for (const k of Object.keys(input))
    if (!KNOWN_KEYS.includes(k)) throw bad(`invalid scenario key ${k}: expected one of ${KNOWN_KEYS.join(', ')}`, k, file);
  const out: ScenarioInput = {};
  if (input.remove !== undefined) {
    if (!Array.isArray(input.remove)) throw bad('invalid scenario remove: expected a list', undefined, file);
    out.remove = input.remove.map((r, i) => {
      if (typeof r === 'string') return r;
      if (!isObject(r)) throw bad(`invalid scenario remove[${i}]: expected a stop id or {stop, routes}`, JSON.stringify(r), file);
      for (const k of Object.keys(r))
        if (k !== 'stop' && !FILTER_KEYS.includes(k))
          throw bad(`invalid scenario key remove[${i}].${k}: expected stop, ${FILTER_KEYS.join(', ')}`, k, file);
      if (typeof r.stop !== 'string' || r.stop === '')
        throw bad(`invalid scenario remove[${i}].stop: expected a stop id or name`, JSON.stringify(r.stop), file);
      return { stop: r.stop, ...parseFilter(r, `remove[${i}]`, file) };
    });
  }
  if (input.add !== undefined) {
    if (!Array.isArray(input.add)) throw bad('invalid scenario add: expected a list', undefined, file);
    out.add = input.add.map((a, i) => {
      if (!isObject(a)) throw bad(`invalid scenario add[${i}]: expected {lat, lon, route?, name?}`, JSON.stringify(a), file);
      for (const k of Object.keys(a))
        if (!['lat', 'lon', 'route', 'name', 'patterns'].includes(k))
          throw bad(`invalid scenario key add[${i}].${k}: expected lat, lon, route, name or patterns`, k, file);
      if (a.patterns !== undefined && (!Array.isArray(a.patterns) || a.patterns.some((x) => typeof x !== 'string')))
        throw bad(`invalid scenario add[${i}].patterns: expected a list of pattern ids`, JSON.stringify(a.patterns), file);
      if (a.route !== undefined && typeof a.route !== 'string')
        throw bad(`invalid scenario add[${i}].route: expected a route id`, JSON.stringify(a.route), file);
      if (a.name !== undefined && typeof a.name !== 'string')
        throw bad(`invalid scenario add[${i}].name: expected text`, JSON.stringify(a.name), file);
      return {
        ...latLon(a.lat, a.lon, `add[${i}]`, file),
        ...(a.route !== undefined ? { route: a.route as string } : {}),
        ...(a.name !== undefined ? { name: a.name as string } : {}),
        ...(a.patterns !== undefined ? { patterns: a.patterns as string[] } : {}),
      };
    });
  }
  if (input.move !== undefined) {
    if (!Array.isArray(input.move)) throw bad('invalid scenario move: expected a list', undefined, file);
    out.move = input.move.map((m, i) => {
      if (!isObject(m)) throw bad(`invalid scenario move[${i}]: expected {stop, lat, lon}`, JSON.stringify(m), file);
      for (const k of Object.keys(m))
        if (!['stop', 'lat', 'lon', ...FILTER_KEYS].includes(k))
          throw bad(`invalid scenario key move[${i}].${k}: expected stop, lat, lon, ${FILTER_KEYS.join(', ')}`, k, file);
      if (typeof m.stop !== 'string' || m.stop === '')
        throw bad(`invalid scenario move[${i}].stop: expected a stop id or name`, JSON.stringify(m.stop), file);
      return { stop: m.stop, ...latLon(m.lat, m.lon, `move[${i}]`, file), ...parseFilter(m, `move[${i}]`, file) };
    });
  }
  if (!out.remove?.length && !out.add?.length && !out.move?.length)
    throw bad('invalid scenario: nothing to remove, add or move', undefined, file);
  return out;
}

/** Builds a scenario from command-line strings: remove STOP; add LAT,LON[:ROUTE]; move STOP:LAT,LON. */
export function scenarioFromOptions({
  remove = [],
  add = [],
  move = [],
  filter = {},
}: {
  remove?: string[];
  add?: string[];
  move?: string[];
  filter?: StopFilter;
}): ScenarioInput {
  const hasFilter = Object.keys(filter).length > 0;
  const addOut = add.map((s) => {
    const m = /^\s*([-+0-9.eE]+)\s*,\s*([-+0-9.eE]+)\s*(?::\s*(.+))?$/.exec(s);
    if (!m) throw bad('invalid option --add: expected LAT,LON[:ROUTE_ID]', s);
    return { lat: Number(m[1]), lon: Number(m[2]), ...(m[3] ? { route: m[3].trim() } : {}) };
  });
  const moveOut = move.map((s) => {
    const m = /^(.+):\s*([-+0-9.eE]+)\s*,\s*([-+0-9.eE]+)\s*$/.exec(s);
    if (!m) throw bad('invalid option --move: expected STOP_ID:LAT,LON', s);
    return { stop: m[1].trim(), lat: Number(m[2]), lon: Number(m[3]), ...filter };
  });
  const removeOut = hasFilter ? remove.map((stop) => ({ stop, ...filter })) : remove;
  return parseScenario({
    ...(removeOut.length ? { remove: removeOut } : {}),
    ...(addOut.length ? { add: addOut } : {}),
    ...(moveOut.length ? { move: moveOut } : {}),
  });
}

/** Reads a scenario JSON file. */
export function loadScenarioFile(path: string): ScenarioInput {
  const parsed = readJsonFile(path, 'bad-scenario', 'scenario file');
  return parseScenario(parsed, { file: path });
}

/** How many matching stops or near spellings an error lists at most. */
const LISTED = 8;

const nameKey = (s: string): string => s.trim().replace(/\s+/g, ' ').toLowerCase();

/** Whether a pattern passes a stop filter (routes by route_id or short name, direction_id, headsign). */
function patternPasses(feed: Feed, prep: PreparedPattern, f: StopFilter): boolean {
  const p = prep.pattern;
  if (f.patterns && !f.patterns.includes(p.id)) return false;
  if (f.routes && !f.routes.some((r) => r === p.routeId || (feed.routes.get(p.routeId)?.shortName ?? '') === r)) return false;
  if (f.direction !== undefined && p.directionId !== f.direction) return false;
  if (f.headsign !== undefined && nameKey(p.headsign) !== nameKey(f.headsign)) return false;
  return true;
}

/** A stop as a person tells it apart: id, name, and each route, direction and headsign serving it. */
function describeStop(feed: Feed, preps: PreparedPattern[], stopIdx: number): string {
  const s = feed.stops[stopIdx];
  const served = new Set<string>();
  for (const prep of preps) {
    if (!prep.modelStops.some((j) => prep.pattern.stopIdx[j] === stopIdx)) continue;
    const route = feed.routes.get(prep.pattern.routeId);
    served.add(
      `route ${route?.shortName || prep.pattern.routeId} direction ${prep.pattern.directionId < 0 ? '-' : prep.pattern.directionId}${prep.pattern.headsign ? ` to ${prep.pattern.headsign}` : ''}`,
    );
  }
  return `${s.id}  ${s.name}: ${served.size ? [...served].sort().join('; ') : 'no pattern on the analysis date'}`;
}

/**
 * The stops a scenario item means: a stop_id, else every passenger stop of that name (case and spacing
 * ignored) that a pattern passing the filter serves. Several left and not both_directions: ambiguous, and
 * the error lists them with routes, direction and headsign; none of that name: the nearest spellings.
 */
function resolveStops(feed: Feed, preps: PreparedPattern[], ref: string, f: StopFilter, where: string): number[] {
  const byId = feed.stopIndex.get(ref);
  if (byId !== undefined) return [byId];
  const wanted = nameKey(ref);
  const isStop = (i: number) => feed.stops[i].locationType === 0 || Number.isNaN(feed.stops[i].locationType);
  const hits: number[] = [];
  feed.stops.forEach((s, i) => {
    if (isStop(i) && nameKey(s.name) === wanted) hits.push(i);
  });
  const list = (idx: number[]) => [
    ...idx.slice(0, LISTED).map((i) => describeStop(feed, preps, i)),
    ...(idx.length > LISTED ? [`... and ${idx.length - LISTED} more`] : []),
  ];
  if (hits.length === 0) {
    const near = nearestNames(
      ref,
      feed.stops.filter((_, i) => isStop(i)).map((s) => s.name),
      { max: Math.max(2, Math.floor(wanted.length / 4)), limit: LISTED, key: nameKey },
    );
    throw new StopspanError(
      'bad-scenario',
      `${where}: unknown stop "${ref}" (neither a stop_id nor a stop name of the feed)${near.length ? '; nearest names:' : ''}`,
      { value: ref, choices: near },
    );
  }
  const serving = (i: number) =>
    preps.some((prep) => patternPasses(feed, prep, f) && prep.modelStops.some((j) => prep.pattern.stopIdx[j] === i));
  const matching = hits.filter(serving);
  const filterText = [
    f.routes ? `route ${f.routes.join(', ')}` : '',
    f.direction !== undefined ? `direction ${f.direction}` : '',
    f.headsign ? `headsign "${f.headsign}"` : '',
  ]
    .filter(Boolean)
    .join(', ');
  if (matching.length === 0) {
    throw new StopspanError(
      'bad-scenario',
      `${where}: no stop named "${ref}" is served${filterText ? ` by ${filterText}` : ''} on the analysis date; stops of that name:`,
      { value: ref, choices: list(hits) },
    );
  }
  if (matching.length === 1 || f.both_directions) return matching;
  throw new StopspanError(
    'bad-scenario',
    `${where}: stop name "${ref}" is ambiguous (${matching.length} stops${filterText ? ` on ${filterText}` : ''}); give the stop_id, --route with --direction or --headsign, or --both-directions:`,
    { value: ref, choices: list(matching) },
  );
}

/** Nearest point of a pattern's line of stops to (lat, lon): distance along and offset, metres. */
function project(feed: Feed, prep: PreparedPattern, lat: number, lon: number): { posM: number; offsetM: number } {
  const stops = prep.modelStops.map((j) => feed.stops[prep.pattern.stopIdx[j]]);
  return nearestOnStopLine(
    stops.map((s) => s.lat),
    stops.map((s) => s.lon),
    prep.posM,
    lat,
    lon,
  );
}

interface Served {
  pos: number;
  existing: number; // model stop index, -1 for a new or moved stop
}

export interface PatternEdit {
  prep: PreparedPattern;
  removed: Set<number>; // model positions
  moved: Map<number, number>; // model position -> new distance along
  added: number[]; // distances along
}

function totalStops(
  c: Corridor,
  served: Served[],
  s: CostSettings,
  loM = -Infinity,
  hiM = Infinity,
): { costS: Float64Array; busS: Float64Array } {
  // only the stops from loM to hiM (the stretch a change can reach); the others stay 0
  const costS = new Float64Array(served.length);
  const busS = new Float64Array(served.length);
  for (let t = Math.max(1, firstAtOrAbove(served, loM)); t + 1 < served.length && served[t].pos <= hiM; t++) {
    const r = servedStopCost(c, served[t - 1].pos, served[t].pos, served[t + 1].pos, served[t].existing, s);
    costS[t] = r.costS;
    busS[t] = r.busTimePerTripS;
  }
  return { costS, busS };
}

/** The first index of a list sorted by pos whose pos is at or above y (the length when none is). */
function firstAtOrAbove(served: Served[], y: number): number {
  let l = 0;
  let h = served.length;
  while (l < h) {
    const mid = (l + h) >> 1;
    if (served[mid].pos < y) l = mid + 1;
    else h = mid;
  }
  return l;
}

/**
 * The stretch of pattern a change can reach: from the second stop served before the first position it
 * touches to the second after the last. Outside it every stop keeps both neighbours, so its cell, its
 * riders' walk and its delay are what they were: they add exactly nothing to the change's figures. The
 * stops served are today's unless `servedPos` (sorted) gives those of another state, such as a programme's
 * accepted edits, against which the change is then weighed.
 */
export function reachOf(change: PatternEdit, servedPos: ArrayLike<number> = change.prep.posM): Window {
  const t = touchedSpan(change);
  return t.loM > t.hiM ? t : reachAround(servedPos, t.loM, t.hiM);
}

/** From the first position a change touches (a stop removed, moved or added) to the last; empty when none. */
export function touchedSpan(change: PatternEdit): Window {
  const pos = change.prep.posM;
  const touched: number[] = [...change.added];
  for (const m of change.removed) touched.push(pos[m]);
  for (const [m, to] of change.moved) touched.push(pos[m], to);
  if (touched.length === 0) return { loM: Infinity, hiM: -Infinity };
  return { loM: Math.min(...touched), hiM: Math.max(...touched) };
}

/** From the second position served below p0 to the second above p1 (servedPos sorted). */
export function reachAround(servedPos: ArrayLike<number>, p0: number, p1: number): Window {
  let below = 0;
  let loM = -Infinity;
  for (let m = servedPos.length - 1; m >= 0; m--) {
    if (servedPos[m] < p0 && ++below === 2) {
      loM = servedPos[m];
      break;
    }
  }
  let above = 0;
  let hiM = Infinity;
  for (let m = 0; m < servedPos.length; m++) {
    if (servedPos[m] > p1 && ++above === 2) {
      hiM = servedPos[m];
      break;
    }
  }
  return { loM, hiM };
}

/** A stretch of pattern, metres along it. */
export interface Window {
  loM: number;
  hiM: number;
}

/** The stops served today and after a change, in order along the pattern. */
function servedLists(change: PatternEdit): { today: Served[]; after: Served[] } {
  const { prep, removed, moved, added } = change;
  let today = todayOf.get(prep);
  if (!today) todayOf.set(prep, (today = prep.posM.map((pos, m) => ({ pos, existing: m }))));
  // the stops kept stay in today's order; the new and moved ones, sorted, are merged in before any kept
  // stop at the same place (the order a sort by place, then by existing index, gives)
  const extra: number[] = [];
  for (const [, to] of [...moved].sort((a, b) => a[0] - b[0])) extra.push(to);
  extra.push(...added);
  const extraSorted = extra.map((pos, k) => ({ pos, k })).sort((a, b) => a.pos - b.pos || a.k - b.k);
  const after: Served[] = [];
  let e = 0;
  for (const s of today) {
    if (removed.has(s.existing) || moved.has(s.existing)) continue;
    while (e < extraSorted.length && extraSorted[e].pos <= s.pos) after.push({ pos: extraSorted[e++].pos, existing: -1 });
    after.push(s);
  }
  while (e < extraSorted.length) after.push({ pos: extraSorted[e++].pos, existing: -1 });
  return { today, after };
}
const todayOf = new WeakMap<PreparedPattern, Served[]>();

/** The positions served after a change (sorted): the state a further change is weighed against. */
export function servedAfter(change: PatternEdit): number[] {
  return servedLists(change).after.map((s) => s.pos);
}

/**
 * A change's figures against today, summed over the tiles and stops inside `window` only: each is a sum of
 * terms per tile (walk, riders affected) and per stop served (delay), so two changes that agree outside a
 * window differ by exactly the difference of these sums over it.
 */
export interface EffectTerms {
  walkAddedM: number; // metres walked further, summed over riders
  walkSavedM: number; // metres walked less
  affected: number; // riders whose stop changes
  rideSavedS: number; // delay saved at stops no longer served, less that of new stops (s a day)
  neighboursS: number; // the changed delay at stops kept (s a day)
  busSavedS: number; // run time saved per trip (s)
  spanLoM: number; // the stretch the sums looked at: the window and the tiles that meet it
  spanHiM: number;
}

export function effectTerms(change: PatternEdit, settings: CostSettings, window: Window, lists = servedLists(change)): EffectTerms {
  const c = change.prep.corridor;
  const posM = change.prep.posM;
  const { today, after } = lists;
  // walk, tile by tile (each tile's riders used stop m today)
  let walkAddedM = 0;
  let walkSavedM = 0;
  let affected = 0;
  // the tiles that meet the window (tiles are in order along the line; the others are the same in both states)
  let m0 = 0;
  for (let h = c.n; m0 < h;) {
    const mid = (m0 + h) >> 1;
    if (c.tileBounds(mid).hiM < window.loM) m0 = mid + 1;
    else h = mid;
  }
  let m1 = m0; // one past the last
  let spanLoM = window.loM;
  let spanHiM = window.hiM;
  for (; m1 < c.n; m1++) {
    const { loM, hiM } = c.tileBounds(m1);
    if (loM > window.hiM) break;
    if (loM < spanLoM) spanLoM = loM;
    if (hiM > spanHiM) spanHiM = hiM;
  }
  // where each existing stop kept in that stretch stands in after (a stop lies inside its own tile)
  const placeAfter = new Map<number, number>();
  for (let t = firstAtOrAbove(after, spanLoM); t < after.length && after[t].pos <= spanHiM; t++) {
    if (after[t].existing >= 0) placeAfter.set(after[t].existing, t);
  }
  for (let m = m0; m < m1; m++) {
    const { loM, hiM } = c.tileBounds(m);
    const before = c.walkToPointM(loM, hiM, posM[m]);
    const now = walkToNearestM(c, loM, hiM, after);
    if (now > before) walkAddedM += now - before;
    else walkSavedM += before - now;
    const ends = c.endsBetween(loM, hiM);
    const t = placeAfter.get(m) ?? -1;
    if (t < 0) affected += ends;
    else {
      const l = t === 0 ? -Infinity : (after[t - 1].pos + after[t].pos) / 2;
      const r = t === after.length - 1 ? Infinity : (after[t].pos + after[t + 1].pos) / 2;
      const a = Math.max(loM, l);
      const b = Math.min(hiM, r);
      affected += ends - (b > a ? c.endsBetween(a, b) : 0);
    }
  }

  // delay at stops
  const st0 = totalStops(c, today, settings, window.loM, window.hiM);
  const st1 = totalStops(c, after, settings, window.loM, window.hiM);
  let rideSavedS = 0;
  let neighboursS = 0;
  // (the costs are 0 outside the window, so only its stops add anything)
  for (let t = firstAtOrAbove(today, window.loM); t < today.length && today[t].pos <= window.hiM; t++) {
    const u = placeAfter.get(t) ?? -1; // today's stop t is model stop t
    if (u < 0) rideSavedS += st0.costS[t];
    else neighboursS += st1.costS[u] - st0.costS[t];
  }
  for (let t = firstAtOrAbove(after, window.loM); t < after.length && after[t].pos <= window.hiM; t++) {
    if (after[t].existing < 0) rideSavedS -= st1.costS[t];
  }
  const busSavedS = st0.busS.reduce((x, y) => x + y, 0) - st1.busS.reduce((x, y) => x + y, 0);
  return { walkAddedM, walkSavedM, affected, rideSavedS, neighboursS, busSavedS, spanLoM, spanHiM };
}

function walkToNearestM(c: Corridor, u: number, v: number, served: Served[]): number {
  // only the stops whose cells (midpoint to midpoint) overlap [u, v) add anything: start at the first cell
  // ending after u (served is sorted, so cell ends rise) and stop at the first starting at or after v. The
  // same terms in the same order as a scan of every stop, without the scan (effectOf runs per tile, and the
  // audit's programme runs effectOf for every candidate it re-weighs).
  const n = served.length;
  const hiOf = (t: number) => (t === n - 1 ? Infinity : (served[t].pos + served[t + 1].pos) / 2);
  let l = 0;
  let h = n - 1;
  while (l < h) {
    const mid = (l + h) >> 1;
    if (hiOf(mid) > u) h = mid;
    else l = mid + 1;
  }
  let total = 0;
  for (let t = l; t < n; t++) {
    const lo = t === 0 ? -Infinity : (served[t - 1].pos + served[t].pos) / 2;
    if (lo >= v) break;
    const a = Math.max(u, lo);
    const b = Math.min(v, hiOf(t));
    if (b > a) total += c.walkToPointM(a, b, served[t].pos);
  }
  return total;
}

function coverage(served: Served[], startM: number, endM: number, radiusM: number): number {
  const D = endM - startM;
  if (!(D > 0)) return 1;
  let covered = 0;
  let reach = startM;
  for (const s of served) {
    const a = Math.max(reach, s.pos - radiusM, startM);
    const b = Math.min(s.pos + radiusM, endM);
    if (b > a) covered += b - a;
    reach = Math.max(reach, b);
  }
  return Math.min(1, covered / D);
}

function largestGap(served: Served[]): number {
  let g = 0;
  for (let t = 0; t + 1 < served.length; t++) g = Math.max(g, served[t + 1].pos - served[t].pos);
  return g;
}

export function effectOf(feed: Feed, change: PatternEdit, params: ModelParams, walkWeight: number): ScenarioPatternEffect {
  const { prep, removed, moved, added } = change;
  const c = prep.corridor;
  const settings = costSettings(prep, params, { walkWeight });
  const wv = settings.walkWeight / settings.walkSpeedMps;
  const lists = servedLists(change);
  const { today, after } = lists;
  const { walkAddedM, walkSavedM, affected, rideSavedS, neighboursS, busSavedS } = effectTerms(change, settings, reachOf(change), lists);
  const walkAdded = (wv * walkAddedM) / 60;
  const walkSaved = (wv * walkSavedM) / 60;
  const rideSaved = rideSavedS / 60;
  const neighbours = neighboursS / 60;
  const radius = params.max_gap_m / 2;
  const stopId = (m: number) => feed.stops[prep.pattern.stopIdx[prep.modelStops[m]]]?.id ?? '';
  const stopName = (m: number) => feed.stops[prep.pattern.stopIdx[prep.modelStops[m]]]?.name ?? '';
  const changesOut = stopChanges(change, today, after, params.max_gap_m, stopId, stopName, (m) => prep.nearStation[m] ?? '');
  const perRiderM = walkAddedM > 0 && affected > 0 ? walkAddedM / affected : 0;
  return {
    patternId: prep.pattern.id,
    routeId: prep.pattern.routeId,
    tripsPerDay: prep.pattern.tripsPerDay,
    demandSource: prep.demand.demandSource,
    removedStopIds: [...removed].sort((a, b) => a - b).map(stopId),
    movedStopIds: [...moved.keys()].sort((a, b) => a - b).map(stopId),
    addedCount: added.length,
    changes: changesOut,
    ridersAffectedPerDay: affected,
    walkAddedMinPerDay: walkAddedM / settings.walkSpeedMps / 60,
    walkAddedPaxMinPerDay: walkAdded,
    walkAddedPerRiderM: perRiderM,
    walkAddedPerRiderS: perRiderM / settings.walkSpeedMps,
    walkSavedPaxMinPerDay: walkSaved,
    rideSavedPaxMinPerDay: rideSaved,
    neighboursExtraPaxMinPerDay: neighbours,
    netPaxMinPerDay: walkAdded - walkSaved - rideSaved + neighbours,
    runTimeSavedPerTripS: busSavedS,
    vehicleHoursPerDay: (busSavedS * prep.pattern.tripsPerDay) / 3600,
    largestGapBeforeM: largestGap(today),
    largestGapAfterM: largestGap(after),
    coverageBefore: coverage(today, c.startM, c.endM, radius),
    coverageAfter: coverage(after, c.startM, c.endM, radius),
  };
}

/** Each stop changed on a pattern, with the spacing around its place before and after the change. */
function stopChanges(
  change: PatternEdit,
  today: Served[],
  after: Served[],
  maxGapM: number,
  stopId: (m: number) => string,
  stopName: (m: number) => string,
  nearStation: (m: number) => string,
): StopChange[] {
  // each list's positions sorted once, and each stop's neighbours found by halving: a scan of the list per
  // changed stop made a plan removing most of a long pattern's stops quadratic in its stops
  const sorted = (list: Served[]): Float64Array => Float64Array.from(list.map((s) => s.pos).filter((x) => !Number.isNaN(x))).sort();
  const todayPos = sorted(today);
  const afterPos = sorted(after);
  /** The first index whose position is above pos (orEqual: at or above). */
  const firstAbove = (xs: Float64Array, pos: number, orEqual: boolean): number => {
    let a = 0;
    let b = xs.length;
    while (a < b) {
      const mid = (a + b) >>> 1;
      if (xs[mid] < pos || (!orEqual && xs[mid] === pos)) a = mid + 1;
      else b = mid;
    }
    return a;
  };
  const around = (xs: Float64Array, pos: number): number[] => {
    // the gap between the nearest stops at or before pos and at or after it
    const lo = firstAbove(xs, pos, false) - 1;
    const hi = firstAbove(xs, pos, true);
    return lo >= 0 && hi < xs.length ? [xs[hi] - xs[lo]] : [];
  };
  const split = (xs: Float64Array, pos: number): number[] => {
    // the gaps from pos to the nearest stops strictly before and after it
    const lo = firstAbove(xs, pos, true) - 1;
    const hi = firstAbove(xs, pos, false);
    return [lo >= 0 ? pos - xs[lo] : -Infinity, hi < xs.length ? xs[hi] - pos : Infinity].filter(Number.isFinite);
  };
  const out: StopChange[] = [];
  const mark = (c: Omit<StopChange, 'overPolicy' | 'nearStation'>, station = ''): void => {
    const before = Math.max(0, ...c.gapsBeforeM);
    out.push({ ...c, overPolicy: c.gapsAfterM.some((g) => g > maxGapM && g > before), nearStation: station });
  };
  const { prep, removed, moved, added } = change;
  for (const m of [...removed].sort((a, b) => a - b)) {
    mark(
      {
        action: 'remove',
        stopId: stopId(m),
        stopName: stopName(m),
        gapsBeforeM: split(todayPos, prep.posM[m]),
        gapsAfterM: around(afterPos, prep.posM[m]),
      },
      nearStation(m),
    );
  }
  for (const [m, to] of [...moved].sort((a, b) => a[0] - b[0])) {
    mark(
      {
        action: 'move',
        stopId: stopId(m),
        stopName: stopName(m),
        gapsBeforeM: split(todayPos, prep.posM[m]),
        gapsAfterM: split(afterPos, to),
      },
      nearStation(m),
    );
  }
  for (const pos of added) {
    mark({ action: 'add', stopId: '', stopName: '', gapsBeforeM: around(todayPos, pos), gapsAfterM: split(afterPos, pos) });
  }
  return out;
}

function totalsOf(effects: ScenarioPatternEffect[], maxGapM: number, walkSpeedMps: number): ScenarioTotals {
  const sum = (f: (e: ScenarioPatternEffect) => number) => effects.reduce((s, e) => s + f(e), 0);
  const trips = sum((e) => e.tripsPerDay);
  const riders = sum((e) => e.ridersAffectedPerDay);
  const walkAddedM = sum((e) => e.walkAddedMinPerDay) * 60 * walkSpeedMps;
  const perRiderM = walkAddedM > 0 && riders > 0 ? walkAddedM / riders : 0;
  return {
    patternsAffected: effects.length,
    walkAddedMinPerDay: sum((e) => e.walkAddedMinPerDay),
    walkAddedPerRiderM: perRiderM,
    walkAddedPerRiderS: perRiderM / walkSpeedMps,
    ridersAffectedPerDay: riders,
    walkAddedPaxMinPerDay: sum((e) => e.walkAddedPaxMinPerDay),
    walkSavedPaxMinPerDay: sum((e) => e.walkSavedPaxMinPerDay),
    rideSavedPaxMinPerDay: sum((e) => e.rideSavedPaxMinPerDay),
    neighboursExtraPaxMinPerDay: sum((e) => e.neighboursExtraPaxMinPerDay),
    netPaxMinPerDay: sum((e) => e.netPaxMinPerDay),
    runTimeSavedPerTripS: trips > 0 ? sum((e) => e.runTimeSavedPerTripS * e.tripsPerDay) / trips : 0,
    vehicleHoursPerDay: sum((e) => e.vehicleHoursPerDay),
    largestGapBeforeM: Math.max(0, ...effects.map((e) => e.largestGapBeforeM)),
    largestGapAfterM: Math.max(0, ...effects.map((e) => e.largestGapAfterM)),
    overPolicyAfter: effects.filter((e) => e.largestGapAfterM > maxGapM && e.largestGapAfterM > e.largestGapBeforeM).length,
  };
}

/** A pattern's net passenger-minutes with the walk weight scaled by `scale` (walk added and saved in proportion, ride and stopping as they are). */
export function netAtWalkWeight(
  e: Pick<
    ScenarioPatternEffect,
    'walkAddedPaxMinPerDay' | 'walkSavedPaxMinPerDay' | 'rideSavedPaxMinPerDay' | 'neighboursExtraPaxMinPerDay'
  >,
  scale: number,
): number {
  return scale * (e.walkAddedPaxMinPerDay - e.walkSavedPaxMinPerDay) - e.rideSavedPaxMinPerDay + e.neighboursExtraPaxMinPerDay;
}

/**
 * A checked scenario weighed on patterns already prepared (the audit weighs its own plan this way, on the
 * same preparation): per pattern, in total, and at the sensitivity walk weights.
 */
export function weighScenario(
  feed: Feed,
  date: string,
  preps: PreparedPattern[],
  params: ModelParams,
  sc: ScenarioInput,
): Pick<ScenarioResult, 'patterns' | 'totals' | 'sensitivity' | 'fleet'> {
  const changes = resolveChanges(feed, date, preps, sc);
  const list = [...changes.values()].sort((a, b) => a.prep.pattern.id.localeCompare(b.prep.pattern.id));
  const effects = list.map((ch) => effectOf(feed, ch, params, params.walk_weight));
  // at another walk weight only the walk terms change, in proportion to it: nothing else effectOf sums
  // depends on the weight (costSettings' walkWeight reaches only wv there), so the figures are scaled, not
  // weighed again [D] (test/whatif/whatif.test.ts checks them against the scenario weighed at each weight)
  const sensitivity: ScenarioSensitivity[] = [1.5, 2.5].map((w) => ({
    label: `walk_weight=${w}`,
    walkWeight: w,
    netPaxMinPerDay: effects.reduce((s, e) => s + netAtWalkWeight(e, w / params.walk_weight), 0),
  }));
  const fleet = routeFleet(feed, preps, effects, params.operating_cost_per_vehicle_hour);
  return { patterns: effects, totals: totalsOf(effects, params.max_gap_m, params.walk_speed_mps), sensitivity, fleet };
}

/** The change a checked scenario makes on each pattern it touches (by pattern id); 'bad-scenario' when an item is not understood. */
export function resolveChanges(feed: Feed, date: string, preps: PreparedPattern[], sc: ScenarioInput): Map<string, PatternEdit> {
  const patterns = { date };
  const changes = new Map<string, PatternEdit>();
  const changeOf = (prep: PreparedPattern) => {
    let ch = changes.get(prep.pattern.id);
    if (!ch) changes.set(prep.pattern.id, (ch = { prep, removed: new Set(), moved: new Map(), added: [] }));
    return ch;
  };
  // a pattern's model positions by feed stop, built when the pattern is first looked at: a scan of the
  // pattern per stop named made a plan dropping most of a long pattern's stops quadratic in its stops
  const positionsByPattern = new Map<PreparedPattern, Map<number, number[]>>();
  const positionsOf = (prep: PreparedPattern, stopIdx: number): number[] => {
    let at = positionsByPattern.get(prep);
    if (!at) {
      const made = new Map<number, number[]>();
      prep.modelStops.forEach((j, m) => {
        const list = made.get(prep.pattern.stopIdx[j]);
        if (list) list.push(m);
        else made.set(prep.pattern.stopIdx[j], [m]);
      });
      positionsByPattern.set(prep, (at = made));
    }
    return at.get(stopIdx) ?? [];
  };
  const checkRoutes = (routes: string[] | undefined, where: string) => {
    for (const r of routes ?? [])
      if (!feed.routes.has(r) && ![...feed.routes.values()].some((x) => x.shortName === r))
        throw bad(`${where}: unknown route ${r} (neither a route_id nor a route_short_name)`, r);
  };
  const checkPatterns = (ids: string[] | undefined, where: string) => {
    for (const id of ids ?? [])
      if (!preps.some((p) => p.pattern.id === id)) throw bad(`${where}: unknown pattern ${id} on ${patterns.date}`, id);
  };
  const touched = new Set<string>(); // stop index | pattern id: a stop changed twice on one pattern is refused
  const touch = (stopIdx: number, prep: PreparedPattern, where: string, ref: string) => {
    const key = `${stopIdx}|${prep.pattern.id}`;
    if (touched.has(key)) throw bad(`${where}: stop ${feed.stops[stopIdx].id} is named twice in the scenario`, ref);
    touched.add(key);
  };
  const filterOf = (item: string | ({ stop: string } & StopFilter)): StopFilter => (typeof item === 'string' ? {} : item);
  const describeFilter = (f: StopFilter) =>
    [
      f.patterns ? `pattern ${f.patterns.join(', ')}` : '',
      f.routes ? `route ${f.routes.join(', ')}` : '',
      f.direction !== undefined ? `direction ${f.direction}` : '',
      f.headsign ? `headsign "${f.headsign}"` : '',
    ]
      .filter(Boolean)
      .join(', ');

  (sc.remove ?? []).forEach((item, i) => {
    const ref = typeof item === 'string' ? item : item.stop;
    const f = filterOf(item);
    const where = `remove[${i}]`;
    checkRoutes(f.routes, where);
    checkPatterns(f.patterns, where);
    for (const stopIdx of resolveStops(feed, preps, ref, f, where)) {
      let hit = 0;
      for (const prep of preps) {
        if (!patternPasses(feed, prep, f)) continue;
        for (const m of positionsOf(prep, stopIdx)) {
          if (m === 0 || m === prep.modelStops.length - 1)
            throw bad(`${where}: stop ${feed.stops[stopIdx].id} is a terminal of pattern ${prep.pattern.id} and cannot be removed`, ref);
          touch(stopIdx, prep, where, ref);
          changeOf(prep).removed.add(m);
          hit++;
        }
      }
      if (hit === 0)
        throw bad(
          `${where}: stop ${feed.stops[stopIdx].id} is not served by any pattern${describeFilter(f) ? ` of ${describeFilter(f)}` : ''} on ${patterns.date}`,
          ref,
        );
    }
  });

  (sc.move ?? []).forEach((item, i) => {
    const where = `move[${i}]`;
    checkRoutes(item.routes, where);
    checkPatterns(item.patterns, where);
    for (const stopIdx of resolveStops(feed, preps, item.stop, item, where)) {
      let hit = 0;
      for (const prep of preps) {
        if (!patternPasses(feed, prep, item)) continue;
        for (const m of positionsOf(prep, stopIdx)) {
          if (m === 0 || m === prep.modelStops.length - 1)
            throw bad(
              `${where}: stop ${feed.stops[stopIdx].id} is a terminal of pattern ${prep.pattern.id} and cannot be moved`,
              item.stop,
            );
          const p = project(feed, prep, item.lat, item.lon);
          if (p.offsetM > SNAP_LIMIT_M)
            throw bad(
              `${where}: ${item.lat},${item.lon} is ${Math.round(p.offsetM)} m from pattern ${prep.pattern.id} (limit ${SNAP_LIMIT_M} m)`,
              `${item.lat},${item.lon}`,
            );
          touch(stopIdx, prep, where, item.stop);
          changeOf(prep).moved.set(m, p.posM);
          hit++;
        }
      }
      if (hit === 0)
        throw bad(
          `${where}: stop ${feed.stops[stopIdx].id} is not served by any pattern${describeFilter(item) ? ` of ${describeFilter(item)}` : ''} on ${patterns.date}`,
          item.stop,
        );
    }
  });

  (sc.add ?? []).forEach((item, i) => {
    const where = `add[${i}]`;
    checkRoutes(item.route ? [item.route] : undefined, where);
    let hit = 0;
    let nearest = Infinity;
    checkPatterns(item.patterns, where);
    for (const prep of preps) {
      if (item.route && prep.pattern.routeId !== item.route) continue;
      if (item.patterns && !item.patterns.includes(prep.pattern.id)) continue;
      const p = project(feed, prep, item.lat, item.lon);
      nearest = Math.min(nearest, p.offsetM);
      if (p.offsetM > SNAP_LIMIT_M) continue;
      if (!(p.posM > prep.posM[0] && p.posM < prep.posM[prep.posM.length - 1])) continue;
      changeOf(prep).added.push(p.posM);
      hit++;
    }
    if (hit === 0) {
      throw bad(
        `${where}: ${item.lat},${item.lon} is ${Number.isFinite(nearest) ? `${Math.round(nearest)} m from the nearest pattern` : 'not near any pattern'}${item.route ? ` of route ${item.route}` : ''} (limit ${SNAP_LIMIT_M} m, and between its terminals)`,
        `${item.lat},${item.lon}`,
      );
    }
  });

  return changes;
}
