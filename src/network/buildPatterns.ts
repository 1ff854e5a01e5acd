// Route patterns of a feed on the analysis date: trips with the same route_id, direction_id and ordered
// stop_id list, with trips per day, the distance of each stop along the pattern's path, and the scheduled
// run time of each gap. Distances prefer shape_dist_traveled (unit inferred), then forward projection onto
// the shape, then great-circle between consecutive stops; the choice is recorded per pattern.

import type { Feed } from '../gtfs/types.js';
import type { OnProgress } from '../common/progress.js';
import { WarningSink } from '../common/warnings.js';
import { StopspanError } from '../common/errors.js';
import type { DistanceSource, Pattern, PatternSet, DistanceBacktrack } from './types.js';
import { haversineM } from './geodesy.js';
import { coordinateFault } from '../gtfs/coordinateFault.js';
import { prepareShape, projectAlongShape, type PreparedShape } from './alongShape.js';
import { distRange, firstBacktrack, inferShapeDistUnit, shapeDistToMetres } from './shapeDistUnit.js';
import { simplifyPath } from './simplifyPath.js';
import { scheduledTimesOfRuns, warnUntimedTrip, type TimedRun } from './scheduledTimes.js';
import { tripProfiles, type TripProfile } from '../gtfs/stopTimesStore.js';
import { tripInstancesOnDate, type TripRuns as TripInstances } from '../gtfs/frequencies.js';

/**
 * Most route patterns one run measures: 10 000. A whole city's bus network has a few hundred to about a
 * thousand (Manhattan's buses: 151 on a weekday); every pattern costs tens of kilobytes and a millisecond
 * or two in the audit, so past this a feed is refused as too large before memory runs out.
 */
export const MAX_PATTERNS = 10_000;

/**
 * Most stops summed over the patterns of one run: 100 000 (Manhattan's buses: 5 110), each costing a few
 * kilobytes downstream.
 */
export const MAX_PATTERN_STOPS = 100_000;

export interface BuildPatternsOptions {
  /** Analysis date YYYY-MM-DD; defaults to feed.date. */
  date?: string;
  /** Only these routes (route_id, or route_short_name when no route has that id). */
  routes?: string[];
  onProgress?: OnProgress;
  /** Where warnings are counted; without one they are returned in PatternSet.warnings. */
  warnings?: WarningSink;
  /** Tolerance of the simplified map path, metres. */
  pathToleranceM?: number;
}

interface Group {
  routeId: string;
  directionId: number;
  stopIdx: Int32Array;
  tripIds: string[];
  profiles: TripProfile[]; // per trip of tripIds, in the same order once sorted
}

/** A group of trips with its trips per day and its stable id, before it is measured. */
interface Draft {
  g: Group;
  tripsPerDay: number;
  nominal: number;
  id: string;
}

/** Each pattern's representative shape ('' for none) and the shapes prepared for projection. */
interface ShapeChoice {
  shapeOf: Map<Draft, string>;
  prepared: Map<string, PreparedShape>;
}

/** The unit of shape_dist_traveled over the shapes in use, and per shape the metres per unit to read it in. */
interface ShapeUnits {
  unitFit: PatternSet['shapeDistUnit'];
  shapeMetresPerUnit: Map<string, number | null>; // null = do not use
}

/** What measuring the patterns gathers across them, reported once at the end. */
interface MeasureTally {
  backtracks: DistanceBacktrack[];
  routesAtStop: Map<number, Set<string>>;
  projectionFallbacks: number;
  faultyStops: Set<number>; // stop indices with a coordinate fault
}

/**
 * Groups the trips running on the analysis date into patterns and measures them.
 * @example const set = buildPatterns(feed, { date: '2026-10-14' }); set.patterns[0].distAlongM
 */
export function buildPatterns(feed: Feed, options: BuildPatternsOptions = {}): PatternSet {
  const { date = feed.date ?? undefined, routes, onProgress, warnings: givenSink, pathToleranceM = 5 } = options;
  const warnings = givenSink ?? new WarningSink();
  if (date === undefined) {
    throw new StopspanError('bad-option', 'invalid option date: expected YYYY-MM-DD (the feed was read without a date), got nothing');
  }
  if (feed.date !== null && feed.date !== date) {
    throw new StopspanError('bad-option', `invalid option date: expected the date the feed was read for (${feed.date}), got ${date}`, {
      value: date,
    });
  }
  if (feed.held !== undefined && feed.held !== date) {
    throw new StopspanError(
      'bad-option',
      `invalid option date: expected the day the feed's stop_times were held for (${feed.held}), got ${date}`,
      {
        value: date,
      },
    );
  }
  const routeSet = routes !== undefined ? routeIdsOf(feed, routes) : null;
  if (!(pathToleranceM >= 0))
    throw new StopspanError('bad-option', `invalid option pathToleranceM: expected a number >= 0, got ${pathToleranceM}`);

  const instances = tripInstancesOnDate(feed, date);
  const groups = groupTrips(feed, instances, routeSet, date, warnings);
  const drafts = namePatterns(groups, instances);
  const shapes = chooseShapes(feed, drafts, instances, warnings);
  const units = shapeDistUnits(feed, shapes.prepared, warnings);

  // 4. Measure each pattern.
  const tally: MeasureTally = { backtracks: [], routesAtStop: new Map(), projectionFallbacks: 0, faultyStops: new Set() };
  const patterns: Pattern[] = [];
  let done = 0;
  for (const d of drafts) {
    patterns.push(measurePattern(feed, d, shapes, units, tally, { pathToleranceM, warnings }));
    done++;
    if (onProgress && (done % 50 === 0 || done === drafts.length))
      onProgress({ stage: 'patterns', done, total: drafts.length, unit: 'patterns' });
  }
  warnMeasureTally(feed, tally, warnings);
  const set: PatternSet = {
    date,
    patterns,
    routesAtStop: tally.routesAtStop,
    shapeDistUnit: units.unitFit,
    distanceBacktracks: tally.backtracks,
  };
  if (!givenSink) set.warnings = warnings.list();
  return set;
}

/** The route ids the `routes` option names: each a route_id, or a route_short_name when no route has that id. */
function routeIdsOf(feed: Feed, routes: string[]): Set<string> {
  const routeSet = new Set<string>();
  for (const r of routes) {
    if (feed.routes.has(r)) {
      routeSet.add(r);
      continue;
    }
    const byName = [...feed.routes.values()].filter((x) => x.shortName === r);
    if (byName.length === 0)
      throw new StopspanError('bad-option', `invalid option routes: expected route_ids or route_short_names of the feed, got ${r}`, {
        value: r,
      });
    for (const x of byName) routeSet.add(x.id);
  }
  return routeSet;
}

/** 1. Group trips by (route, direction, ordered stop list), from the trips' shared profiles. */
function groupTrips(
  feed: Feed,
  instances: Map<string, TripInstances>,
  routeSet: Set<string> | null,
  date: string,
  warnings: WarningSink,
): Map<string, Group> {
  const profiles = tripProfiles(feed.stopTimes);
  const groups = new Map<string, Group>();
  let patternStops = 0;
  for (const tripId of feed.stopTimes.keys()) {
    if (!instances.has(tripId)) continue;
    const trip = feed.trips.get(tripId);
    if (!trip) continue;
    if (routeSet && !routeSet.has(trip.routeId)) continue;
    const tp = profiles.profile(tripId) as TripProfile;
    if (tp.profile.stopIdx.length < 2) {
      warnings.add('trip-too-short', tripId);
      continue;
    }
    // profiles with the same stop list share its number: a compact, exact key
    const key = `${trip.routeId}\u0000${trip.directionId}\u0000${tp.profile.stopList}`;
    let g = groups.get(key);
    if (!g) {
      patternStops += tp.profile.stopIdx.length;
      if (groups.size >= MAX_PATTERNS || patternStops > MAX_PATTERN_STOPS) throw tooManyPatterns(date, routeSet !== null);
      g = { routeId: trip.routeId, directionId: trip.directionId, stopIdx: tp.profile.stopIdx, tripIds: [], profiles: [] };
      groups.set(key, g);
    }
    g.tripIds.push(tripId);
    g.profiles.push(tp);
  }
  if (groups.size === 0) {
    throw new StopspanError('empty-feed', `no trips with stop_times run on ${date}${routeSet ? ' on the routes asked for' : ''}`, {
      value: date,
    });
  }
  return groups;
}

/** 2. Trips per day and stable ids: n by trips per day descending, ties by first trip id. */
function namePatterns(groups: Map<string, Group>, instances: Map<string, TripInstances>): Draft[] {
  const drafts: Draft[] = [...groups.values()].map((g) => {
    // trips by id, their profiles alongside
    const order = g.tripIds.map((_, k) => k).sort((a, b) => cmp(g.tripIds[a], g.tripIds[b]));
    g.tripIds = order.map((k) => g.tripIds[k]);
    g.profiles = order.map((k) => g.profiles[k]);
    let tripsPerDay = 0;
    let nominal = 0;
    for (const t of g.tripIds) {
      const inst = instances.get(t) as TripInstances;
      tripsPerDay += inst.count;
      nominal += inst.nominal;
    }
    return { g, tripsPerDay, nominal, id: '' };
  });
  const byRouteDir = new Map<string, Draft[]>();
  for (const d of drafts) {
    const k = `${d.g.routeId}\u0000${d.g.directionId}`;
    const list = byRouteDir.get(k) ?? [];
    list.push(d);
    byRouteDir.set(k, list);
  }
  for (const list of byRouteDir.values()) {
    list.sort((a, b) => b.tripsPerDay - a.tripsPerDay || cmp(a.g.tripIds[0], b.g.tripIds[0]));
    list.forEach((d, i) => {
      d.id = `${d.g.routeId}:${d.g.directionId < 0 ? '' : d.g.directionId}:${i + 1}`;
    });
  }
  drafts.sort((a, b) => cmp(a.g.routeId, b.g.routeId) || a.g.directionId - b.g.directionId || cmp(a.id, b.id));
  return drafts;
}

/** 3a. Representative shapes: the one most of a pattern's trips run on, each prepared once (a flat one not). */
function chooseShapes(feed: Feed, drafts: Draft[], instances: Map<string, TripInstances>, warnings: WarningSink): ShapeChoice {
  const shapeOf = new Map<Draft, string>();
  const prepared = new Map<string, PreparedShape>();
  const flatShapes = new Set<string>();
  for (const d of drafts) {
    const counts = new Map<string, number>();
    for (const t of d.g.tripIds) {
      const sid = feed.trips.get(t)!.shapeId;
      if (sid === '') continue;
      if (!feed.shapes.has(sid)) {
        warnings.add('unknown-shape', `${t} shape_id ${sid}`);
        continue;
      }
      counts.set(sid, (counts.get(sid) ?? 0) + (instances.get(t) as TripInstances).count);
    }
    const shapeId = mostCommon(counts);
    shapeOf.set(d, shapeId);
    if (shapeId !== '' && !prepared.has(shapeId) && !flatShapes.has(shapeId)) {
      const s = feed.shapes.get(shapeId)!;
      if (s.lat.length >= 2) {
        const ps = prepareShape(s);
        // a shape under a metre long (every point at one place) has no path to measure along
        if (ps.lengthM >= MIN_SHAPE_LENGTH_M) prepared.set(shapeId, ps);
        else {
          flatShapes.add(shapeId);
          warnings.add('shape-zero-length', shapeId);
        }
      }
    }
  }
  return { shapeOf, prepared };
}

/** 3b. The unit of shape_dist_traveled over the shapes in use; shapes read in their own unit or not at all. */
function shapeDistUnits(feed: Feed, prepared: Map<string, PreparedShape>, warnings: WarningSink): ShapeUnits {
  const unitSamples: { distRange: number; lengthM: number }[] = [];
  const shapeRatio = new Map<string, number>();
  for (const [sid, ps] of prepared) {
    const dist = feed.shapes.get(sid)!.dist;
    const [i0, i1] = finiteEnds(dist);
    if (i0 < 0 || i1 <= i0) continue;
    const sample = { distRange: dist[i1] - dist[i0], lengthM: ps.cumM[i1] - ps.cumM[i0] };
    if (sample.distRange > 0 && sample.lengthM > 0) {
      unitSamples.push(sample);
      shapeRatio.set(sid, sample.lengthM / sample.distRange);
    }
  }
  const unitFit = inferShapeDistUnit(unitSamples);
  const shapeMetresPerUnit = new Map<string, number | null>(); // per shape: metres per unit, null = do not use
  if (unitFit) {
    if (unitFit.unit === 'scale') {
      warnings.add('shape-dist-unit-unknown', undefined, 1, { metresPerUnit: unitFit.metresPerUnit.toPrecision(4) });
    } else if (unitFit.poorFit) {
      warnings.add('shape-dist-unit-poor-fit', undefined, 1, { unit: unitFit.unit, misfitPct: (unitFit.misfit * 100).toFixed(1) });
    }
    for (const [sid, r] of shapeRatio) {
      if (Math.abs(Math.log(r / unitFit.metresPerUnit)) <= Math.log(1.1)) {
        shapeMetresPerUnit.set(sid, unitFit.metresPerUnit);
        continue;
      }
      // A shape off the feed's unit: GTFS asks only that shapes.txt and stop_times.txt agree for each
      // shape, so read this one in the named unit its own length fits well, or measure it by projection.
      const own = inferShapeDistUnit([{ distRange: 1, lengthM: r }]);
      if (own && own.unit !== 'scale' && !own.poorFit) {
        shapeMetresPerUnit.set(sid, own.metresPerUnit);
        warnings.add('shape-dist-unit-per-shape', `${sid} in ${own.unit}`, 1, { unit: unitFit.unit });
      } else {
        shapeMetresPerUnit.set(sid, null);
        warnings.add('shape-dist-mismatch', sid);
      }
    }
  }
  return { unitFit, shapeMetresPerUnit };
}

/** 4. One pattern measured: distances along its path, scheduled times, headsign; the routes at its stops tallied. */
function measurePattern(
  feed: Feed,
  d: Draft,
  shapes: ShapeChoice,
  units: ShapeUnits,
  tally: MeasureTally,
  { pathToleranceM, warnings }: { pathToleranceM: number; warnings: WarningSink },
): Pattern {
  const { g } = d;
  const shapeId = shapes.shapeOf.get(d)!;
  const n = g.stopIdx.length;
  const repAt = Math.max(
    0,
    g.tripIds.findIndex((t) => feed.trips.get(t)!.shapeId === shapeId),
  );
  const rep = g.profiles[repAt].profile;
  const ps = shapeId !== '' ? shapes.prepared.get(shapeId) : undefined;
  const { distanceSource, distAlongM, offsetFromShapeM, path } = patternDistances(feed, d, shapeId, repAt, ps, units, tally, {
    pathToleranceM,
    warnings,
  });
  const times = patternTimes(g, distAlongM, warnings);

  const headCounts = new Map<string, number>();
  for (const t of g.tripIds) {
    const h = feed.trips.get(t)!.headsign;
    headCounts.set(h, (headCounts.get(h) ?? 0) + 1);
  }
  for (let i = 0; i < n; i++) {
    let set = tally.routesAtStop.get(g.stopIdx[i]);
    if (!set) tally.routesAtStop.set(g.stopIdx[i], (set = new Set()));
    set.add(g.routeId);
  }
  return {
    id: d.id,
    routeId: g.routeId,
    directionId: g.directionId,
    headsign: mostCommon(headCounts),
    shapeId: ps ? shapeId : '',
    tripIds: g.tripIds,
    tripsPerDay: d.tripsPerDay,
    nominalFrequencyTrips: d.nominal,
    stopIdx: Array.from(g.stopIdx),
    distAlongM,
    offsetFromShapeM,
    distanceSource,
    lengthM: distAlongM[n - 1],
    passengerStop: Array.from(rep.noService, (v) => v !== 1),
    timepoint: Array.from(rep.timepoint, (v) => v === 1),
    gapRunTimeS: times.gapRunTimeS,
    gapTimeInterpolated: times.gapTimeInterpolated,
    runTimeS: times.runTimeS,
    scheduledDwellS: times.scheduledDwellS,
    path,
  };
}

/** 4a. Each stop's distance along the pattern: shape_dist_traveled, else projection onto the shape, else great-circle. */
function patternDistances(
  feed: Feed,
  d: Draft,
  shapeId: string,
  repAt: number,
  ps: PreparedShape | undefined,
  units: ShapeUnits,
  tally: MeasureTally,
  { pathToleranceM, warnings }: { pathToleranceM: number; warnings: WarningSink },
): Pick<Pattern, 'distanceSource' | 'distAlongM' | 'offsetFromShapeM' | 'path'> {
  const { g } = d;
  const n = g.stopIdx.length;
  const allStops = Array.from(g.stopIdx, (i) => feed.stops[i]);
  // stops whose coordinates cannot be a stop's are measured around: the others are measured, and each
  // faulty one placed between its neighbours by order (see placeBetween)
  const good: number[] = [];
  allStops.forEach((s, i) => {
    if (coordinateFault(s.lat, s.lon) === '') good.push(i);
    else tally.faultyStops.add(g.stopIdx[i]);
  });
  const stops = good.length === n ? allStops : good.map((i) => allStops[i]);

  let distanceSource: DistanceSource;
  let distAlongM: number[];
  let offsetFromShapeM: (number | null)[];
  let path: [number, number][];
  if (ps) {
    const proj = projectAlongShape(ps, stops);
    tally.projectionFallbacks += proj.fallbacks;
    offsetFromShapeM = proj.offsetM;
    distAlongM = proj.distAlongM.map((v) => v - proj.distAlongM[0]);
    if (good.length < n) {
      distAlongM = placeBetween(distAlongM, good, n);
      offsetFromShapeM = spreadOffsets(proj.offsetM, good, n);
    }
    distanceSource = 'shape_projection';
    const metres = shapeDistMetres(d, shapeId, repAt, units, tally, warnings);
    if (metres) {
      distAlongM = metres;
      distanceSource = 'shape_dist_traveled';
    }
    path = simplifyPath(ps.lat, ps.lon, { toleranceM: pathToleranceM });
  } else {
    distanceSource = 'great_circle';
    warnings.add('pattern-without-shape', d.id);
    distAlongM = [0];
    for (let i = 1; i < stops.length; i++)
      distAlongM.push(distAlongM[i - 1] + haversineM(stops[i - 1].lat, stops[i - 1].lon, stops[i].lat, stops[i].lon));
    if (good.length < n) distAlongM = placeBetween(distAlongM, good, n);
    offsetFromShapeM = new Array(n).fill(null);
    path = stops.map((s) => [s.lon, s.lat] as [number, number]);
  }
  return { distanceSource, distAlongM, offsetFromShapeM, path };
}

/** 4b. The representative trip's shape_dist_traveled in metres when usable (no trip backtracks), else null. */
function shapeDistMetres(
  d: Draft,
  shapeId: string,
  repAt: number,
  units: ShapeUnits,
  tally: MeasureTally,
  warnings: WarningSink,
): number[] | null {
  const { g } = d;
  const metresPerUnit = units.shapeMetresPerUnit.get(shapeId);
  if (!units.unitFit || !metresPerUnit) return null;
  let usable = true;
  const backtrackOf = new Map<number, number>(); // per profile
  g.tripIds.forEach((t, k) => {
    const { profile, profileId } = g.profiles[k];
    let bt = backtrackOf.get(profileId);
    if (bt === undefined) backtrackOf.set(profileId, (bt = firstBacktrack(profile.shapeDist)));
    if (bt >= 0) {
      usable = false;
      tally.backtracks.push({ patternId: d.id, tripId: t, stopIndex: bt });
      warnings.add('distance-backtrack', `${t} stop ${bt}`);
    }
  });
  const rep = g.profiles[repAt].profile;
  const metres = usable ? shapeDistToMetres(rep.shapeDist, metresPerUnit) : null;
  if (!metres && usable && Number.isFinite(distRange(rep.shapeDist))) warnings.add('partial-shape-dist', g.tripIds[repAt]);
  return metres;
}

/** 4c. Scheduled times: each distinct profile once, counted by its trips; the untimed named trip by trip, as they run. */
function patternTimes(g: Group, distAlongM: number[], warnings: WarningSink): ReturnType<typeof scheduledTimesOfRuns>['times'] {
  const runOf = new Map<number, number>();
  const runs: TimedRun[] = [];
  const runOfTrip = g.profiles.map(({ profile, profileId }) => {
    let r = runOf.get(profileId);
    if (r === undefined) {
      runOf.set(profileId, (r = runs.length));
      runs.push({ arrS: profile.arrRel, depS: profile.depRel, trips: 0 });
    }
    runs[r].trips++;
    return r;
  });
  const { times, untimed } = scheduledTimesOfRuns(runs, distAlongM);
  g.tripIds.forEach((t, k) => {
    if (untimed[runOfTrip[k]]) warnUntimedTrip(warnings, t);
  });
  return times;
}

/** The warnings measuring gathers over every pattern: stops with a coordinate fault, projections that fell back. */
function warnMeasureTally(feed: Feed, tally: MeasureTally, warnings: WarningSink): void {
  if (tally.faultyStops.size > 0) {
    const ids = [...tally.faultyStops].map((k) => feed.stops[k].id);
    warnings.add('stop-coordinate-fault', ids[0], ids.length);
    for (const id of ids.slice(1, 5)) warnings.add('stop-coordinate-fault', id, 0);
  }
  if (tally.projectionFallbacks > 0) {
    warnings.add('projection-fallback', undefined, tally.projectionFallbacks);
  }
}

function tooManyPatterns(date: string, narrowed: boolean): StopspanError {
  return new StopspanError(
    'feed-too-large',
    `the trips running on ${date} form more than ${MAX_PATTERNS} route patterns or ${MAX_PATTERN_STOPS} pattern stops, the caps of one run${narrowed ? '' : ' (audit takes part of a feed with --routes)'}`,
    { value: date },
  );
}

/** Most frequent key; ties go to the smallest key so the choice is stable. '' for an empty map. */
function mostCommon(counts: Map<string, number>): string {
  let best = '';
  let bestN = -1;
  for (const [k, c] of counts) {
    if (c > bestN || (c === bestN && cmp(k, best) < 0)) {
      best = k;
      bestN = c;
    }
  }
  return best;
}

function finiteEnds(dist: ArrayLike<number>): [number, number] {
  let i0 = -1;
  let i1 = -1;
  for (let i = 0; i < dist.length; i++) {
    if (Number.isFinite(dist[i])) {
      if (i0 < 0) i0 = i;
      i1 = i;
    }
  }
  return [i0, i1];
}

function cmp(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Shapes shorter than this are taken as having no path (every point at one place). */
const MIN_SHAPE_LENGTH_M = 1;

/**
 * Distances for all n stops of a pattern from those of the measured ones (`good`, their indices in order):
 * a stop left out is placed between the measured stops around it, in proportion to its place in the order
 * (at the nearest measured stop when it lies before the first or after the last; all at 0 when none is
 * measured).
 */
function placeBetween(measured: number[], good: number[], n: number): number[] {
  const out = new Array<number>(n);
  if (good.length === 0) return out.fill(0);
  good.forEach((i, k) => (out[i] = measured[k]));
  for (let k = 0; k <= good.length; k++) {
    const a = k > 0 ? good[k - 1] : -1; // the measured stop before the run of left-out ones (-1: none)
    const b = k < good.length ? good[k] : n; // and after it (n: none)
    for (let i = a + 1; i < b; i++) {
      if (a < 0) out[i] = out[b];
      else if (b >= n) out[i] = out[a];
      else out[i] = out[a] + ((out[b] - out[a]) * (i - a)) / (b - a);
    }
  }
  return out;
}

/** Offsets from the shape for all n stops: the measured ones' own, null for a stop left out. */
function spreadOffsets(measured: number[], good: number[], n: number): (number | null)[] {
  const out = new Array<number | null>(n).fill(null);
  good.forEach((i, k) => (out[i] = measured[k]));
  return out;
}
