// Comparison of two versions of a feed: stops added, removed, moved and renamed; route patterns added,
// removed and changed (stops inserted or dropped); trips a day per route and pattern where they changed
// (a service cut is the change a nightly job exists to catch); and the spacing picture before and after,
// with the audit's figures and candidates when both audits are given; with a land-use layer audited on both
// sides, the people within a walk of a stop served before and after (coverage).

import { ownCopy } from '../common/ownCopy.js';
import type { Feed, Stop, TripStopTimes } from '../gtfs/types.js';
import type { Pattern, PatternSet } from '../network/types.js';
import type { AuditResult, Candidate, LandUseSummary } from '../audit/types.js';
import { StopspanError } from '../common/errors.js';
import { medianGapM, passengerStopsServed } from '../network/patternFigures.js';
import { runsOfFrequency } from '../gtfs/frequencies.js';
import { haversineM } from '../network/geodesy.js';

export interface StopBrief {
  stopId: string;
  name: string;
  lat: number;
  lon: number;
}
export interface StopMove {
  stopId: string;
  name: string;
  fromLat: number;
  fromLon: number;
  toLat: number;
  toLon: number;
  movedM: number;
}
export interface StopRename {
  stopId: string;
  oldName: string;
  newName: string;
}
export interface PatternBrief {
  patternId: string;
  routeId: string;
  directionId: number;
  headsign: string;
  stopCount: number;
  tripsPerDay: number;
  firstStopId: string;
  lastStopId: string;
}
export interface PatternChange {
  routeId: string;
  directionId: number;
  oldPatternId: string;
  newPatternId: string;
  headsign: string; // the new one
  inserted: string[]; // stop_ids in the new pattern and not matched in the old, in order
  dropped: string[]; // stop_ids in the old pattern and not matched in the new, in order
  /** true when the old pattern became identical to a pattern that already existed (or a new one split off one that stays). */
  merged: boolean;
}
/** Trips a day of one pattern before and after, when they changed (count or departure times). */
export interface PatternTripChange {
  routeId: string;
  directionId: number;
  oldPatternId: string;
  newPatternId: string;
  headsign: string; // the new one
  tripsBefore: number; // a day on the analysis date, frequencies expanded
  tripsAfter: number;
  /** trip_ids running after and not before, and the reverse: the first listCap of each, with the full counts. */
  tripIdsAdded: string[];
  tripIdsAddedCount: number;
  tripIdsRemoved: string[];
  tripIdsRemovedCount: number;
  /** First and last departure from the first stop, H:MM:SS; null when the times are blank. */
  firstDeparture: { before: string | null; after: string | null };
  lastDeparture: { before: string | null; after: string | null };
}
/** Trips a day of one route before and after, when they differ. */
export interface RouteTripChange {
  routeId: string;
  shortName: string;
  tripsBefore: number;
  tripsAfter: number;
  /** Change in percent of the trips before; null for a route that had none (new). */
  changePct: number | null;
}
export interface SpacingPicture {
  patterns: number;
  stopsServed: number;
  tripsPerDay: number;
  medianGapM: number | null; // over every gap between consecutive passenger stops of every pattern
  closeStops: number | null; // from the audit, when given
  wideGaps: number | null;
  paxMinLostPerDay: number | null;
}
export interface CandidateBrief {
  action: 'remove' | 'add';
  stopId: string;
  stopName: string;
  routeIds: string[];
  netPaxMinPerDay: number;
}
export interface FeedIdentity {
  source: string;
  contentHash: string;
  version: string;
}
export interface Comparison {
  old: FeedIdentity;
  new: FeedIdentity;
  moveThresholdM: number;
  stops: { added: StopBrief[]; removed: StopBrief[]; moved: StopMove[]; renamed: StopRename[] };
  /** unchanged: patterns with the same stops and the same departures (a pattern whose trips changed is listed in trips). */
  patterns: { added: PatternBrief[]; removed: PatternBrief[]; changed: PatternChange[]; unchanged: number };
  /** Routes and patterns whose trips a day changed, biggest cuts first; trip_id lists capped at listCap. */
  trips: { byRoute: RouteTripChange[]; byPattern: PatternTripChange[]; listCap: number };
  spacing: { before: SpacingPicture; after: SpacingPicture };
  /** Candidates that appeared or disappeared; null when the audits were not given. */
  candidates: { appeared: CandidateBrief[]; disappeared: CandidateBrief[] } | null;
  /**
   * Stops that lost or gained their link to another mode: served within walking distance of a context
   * feed's station (--context) in one version and not in the other; null without context feeds.
   */
  stationLinks: { lost: StationLink[]; gained: StationLink[] } | null;
  /** People within a walk of a stop served on each version, from the same land-use layer; null without one. */
  coverage: CoverageChange | null;
}

/** Coverage before and after: the same land-use layer's people within a walk of a stop served on each version. */
export interface CoverageChange {
  file: string;
  walkRadiusM: number;
  /** The layer's people (weighted sum of its columns), the same on both sides. */
  people: number;
  /** People (weighted) within a walk of a stop served on the older feed, on the newer, and the difference (after - before). */
  before: number;
  after: number;
  change: number;
  /** Each column read: its weight, its total over the layer, and the part within a walk before and after. */
  columns: { name: string; weight: number; total: number; before: number; after: number; change: number }[];
}

/** A stop beside a context station in one version only, and why: not served in the other, or moved. */
export interface StationLink {
  stopId: string;
  name: string;
  station: string; // the station and distance in the version where the link stands: "station 59 St (nyct-subway), 60 m"
  reason: 'not-served' | 'moved';
}

export interface CompareOptions {
  /** A stop whose position changed by more than this counts as moved. Default 10 m (common practice: below GPS survey noise of a few metres). */
  moveThresholdM?: number;
  /** The audits of both versions, for close stops, wide gaps, passenger-minutes and candidates (what compareFeeds reads of them). */
  audits?: { old: AuditBrief; new: AuditBrief };
  /** Two patterns of the same route and direction are the same pattern changed when they share at least this share of the shorter one's stops. Default 0.5. */
  minSharedShare?: number;
  /** At most this many trip_ids listed per pattern as added or removed (the counts are always whole). Default 10. */
  listCap?: number;
  /** Each version's served stops near a context station (stop index -> note, from contextStops), when context feeds were given. */
  stationStops?: { old: ReadonlyMap<number, string>; new: ReadonlyMap<number, string> };
}

export function compareFeeds(
  oldFeed: Feed,
  newFeed: Feed,
  oldPatterns: PatternSet,
  newPatterns: PatternSet,
  options: CompareOptions = {},
): Comparison {
  const { moveThresholdM = 10, audits, minSharedShare = 0.5, listCap = 10, stationStops } = options;
  if (!(typeof moveThresholdM === 'number' && moveThresholdM >= 0 && Number.isFinite(moveThresholdM))) {
    throw new StopspanError('bad-option', `invalid option moveThresholdM: expected a number >= 0, got ${moveThresholdM}`, {
      value: String(moveThresholdM),
    });
  }
  if (!(minSharedShare > 0 && minSharedShare <= 1)) {
    throw new StopspanError('bad-option', `invalid option minSharedShare: expected a number in (0, 1], got ${minSharedShare}`, {
      value: String(minSharedShare),
    });
  }
  const { patterns, pairs } = comparePatterns(oldFeed, newFeed, oldPatterns, newPatterns, minSharedShare);
  const byPattern = patternTripChanges(oldFeed, newFeed, pairs, listCap);
  patterns.unchanged -= byPattern.filter((x) => x.sameStops).length;
  return {
    old: identity(oldFeed),
    new: identity(newFeed),
    moveThresholdM,
    stops: compareStops(oldFeed, newFeed, moveThresholdM),
    patterns,
    trips: { byRoute: routeTripChanges(oldFeed, newFeed, oldPatterns, newPatterns), byPattern: byPattern.map((x) => x.change), listCap },
    spacing: { before: spacingPicture(oldPatterns, audits?.old), after: spacingPicture(newPatterns, audits?.new) },
    candidates: audits ? compareCandidates(audits.old.candidates, audits.new.candidates) : null,
    stationLinks: stationStops ? compareStationLinks(oldFeed, newFeed, oldPatterns, newPatterns, stationStops) : null,
    coverage: audits ? compareCoverage(audits.old.landUse ?? null, audits.new.landUse ?? null) : null,
  };
}

/** Coverage on both versions from their audits' land-use figures; null unless both audits had the layer. */
function compareCoverage(before: LandUseSummary | null, after: LandUseSummary | null): CoverageChange | null {
  if (!before || !after) return null;
  return {
    file: after.file,
    walkRadiusM: after.walkRadiusM,
    people: after.people,
    before: before.peopleCovered,
    after: after.peopleCovered,
    change: after.peopleCovered - before.peopleCovered,
    columns: after.columns.map((c, k) => {
      const b = before.columns[k]?.covered ?? 0;
      return { name: c.name, weight: c.weight, total: c.total, before: b, after: c.covered, change: c.covered - b };
    }),
  };
}

/** Stops near a context station in one version and not in the other, by stop_id, sorted by stop_id. */
function compareStationLinks(
  oldFeed: Feed,
  newFeed: Feed,
  oldPatterns: PatternSet,
  newPatterns: PatternSet,
  near: { old: ReadonlyMap<number, string>; new: ReadonlyMap<number, string> },
): { lost: StationLink[]; gained: StationLink[] } {
  const byId = (feed: Feed, m: ReadonlyMap<number, string>) =>
    new Map([...m].map(([i, note]) => [feed.stops[i]?.id ?? '', { note, name: feed.stops[i]?.name ?? '' }]));
  const served = (feed: Feed, ps: PatternSet) => new Set(ps.patterns.flatMap((p) => [...p.stopIdx].map((i) => feed.stops[i]?.id ?? '')));
  const oldNear = byId(oldFeed, near.old);
  const newNear = byId(newFeed, near.new);
  const oldServed = served(oldFeed, oldPatterns);
  const newServed = served(newFeed, newPatterns);
  const only = (a: typeof oldNear, b: typeof oldNear, otherServed: Set<string>): StationLink[] =>
    [...a]
      .filter(([id]) => id !== '' && !b.has(id))
      .map(([stopId, x]) => ({
        stopId,
        name: x.name,
        station: x.note,
        reason: otherServed.has(stopId) ? ('moved' as const) : ('not-served' as const),
      }))
      .sort((x, y) => x.stopId.localeCompare(y.stopId));
  return { lost: only(oldNear, newNear, newServed), gained: only(newNear, oldNear, oldServed) };
}

function identity(feed: Feed): FeedIdentity {
  return { source: feed.source, contentHash: feed.contentHash, version: feed.feedInfo?.version ?? '' };
}

const brief = (s: Stop): StopBrief => ({ stopId: s.id, name: s.name, lat: s.lat, lon: s.lon });

function compareStops(oldFeed: Feed, newFeed: Feed, moveThresholdM: number): Comparison['stops'] {
  const added: StopBrief[] = [];
  const removed: StopBrief[] = [];
  const moved: StopMove[] = [];
  const renamed: StopRename[] = [];
  for (const s of oldFeed.stops) {
    const j = newFeed.stopIndex.get(s.id);
    if (j === undefined) {
      removed.push(brief(s));
      continue;
    }
    const t = newFeed.stops[j];
    const movedM = Number.isFinite(s.lat + s.lon + t.lat + t.lon) ? haversineM(s.lat, s.lon, t.lat, t.lon) : 0;
    if (movedM > moveThresholdM)
      moved.push({ stopId: s.id, name: t.name, fromLat: s.lat, fromLon: s.lon, toLat: t.lat, toLon: t.lon, movedM });
    if (s.name !== t.name) renamed.push({ stopId: s.id, oldName: s.name, newName: t.name });
  }
  for (const t of newFeed.stops) if (!oldFeed.stopIndex.has(t.id)) added.push(brief(t));
  const byId = (a: { stopId: string }, b: { stopId: string }) => (a.stopId < b.stopId ? -1 : a.stopId > b.stopId ? 1 : 0);
  moved.sort((a, b) => b.movedM - a.movedM || byId(a, b));
  return { added: added.sort(byId), removed: removed.sort(byId), moved, renamed: renamed.sort(byId) };
}

interface Keyed {
  p: Pattern;
  ids: string[];
  seq: string; // the stop_ids joined
}

function keyed(feed: Feed, set: PatternSet): Map<string, Keyed[]> {
  const byRouteDir = new Map<string, Keyed[]>();
  for (const p of set.patterns) {
    const ids = p.stopIdx.map((i) => feed.stops[i]?.id ?? `#${i}`);
    const k = `${p.routeId}\u0000${p.directionId}`;
    const list = byRouteDir.get(k) ?? [];
    list.push({ p, ids, seq: ids.join('\u0000') });
    byRouteDir.set(k, list);
  }
  return byRouteDir;
}

function patternBrief(k: Keyed): PatternBrief {
  return {
    patternId: k.p.id,
    routeId: k.p.routeId,
    directionId: k.p.directionId,
    headsign: k.p.headsign,
    stopCount: k.ids.length,
    tripsPerDay: k.p.tripsPerDay,
    firstStopId: k.ids[0] ?? '',
    lastStopId: k.ids[k.ids.length - 1] ?? '',
  };
}

/** Longest common subsequence of two id lists: which positions of a and b are matched. */
export function lcsMatch(a: string[], b: string[]): { inA: boolean[]; inB: boolean[]; length: number } {
  const n = a.length;
  const m = b.length;
  const w = m + 1;
  const L = new Int32Array((n + 1) * w);
  for (let i = n - 1; i >= 0; i--) {
    for (let j = m - 1; j >= 0; j--) {
      L[i * w + j] = a[i] === b[j] ? L[(i + 1) * w + j + 1] + 1 : Math.max(L[(i + 1) * w + j], L[i * w + j + 1]);
    }
  }
  const inA = new Array<boolean>(n).fill(false);
  const inB = new Array<boolean>(m).fill(false);
  let i = 0;
  let j = 0;
  while (i < n && j < m) {
    if (a[i] === b[j]) {
      inA[i++] = true;
      inB[j++] = true;
    } else if (L[(i + 1) * w + j] >= L[i * w + j + 1]) i++;
    else j++;
  }
  return { inA, inB, length: L[0] };
}

type PatternPair = { o: Keyed; n: Keyed; sameStops: boolean };

function comparePatterns(
  oldFeed: Feed,
  newFeed: Feed,
  oldSet: PatternSet,
  newSet: PatternSet,
  minShare: number,
): { patterns: Comparison['patterns']; pairs: PatternPair[] } {
  const matched: PatternPair[] = [];
  const oldBy = keyed(oldFeed, oldSet);
  const newBy = keyed(newFeed, newSet);
  const added: PatternBrief[] = [];
  const removed: PatternBrief[] = [];
  const changed: PatternChange[] = [];
  let unchanged = 0;
  for (const k of new Set([...oldBy.keys(), ...newBy.keys()])) {
    const olds = oldBy.get(k) ?? [];
    const news = newBy.get(k) ?? [];
    const newSeqs = new Set(news.map((x) => x.seq));
    const oldSeqs = new Set(olds.map((x) => x.seq));
    const oldLeft = olds.filter((x) => !newSeqs.has(x.seq));
    const newLeft = news.filter((x) => !oldSeqs.has(x.seq));
    unchanged += olds.length - oldLeft.length;
    for (const o of olds) {
      const nw = news.find((x) => x.seq === o.seq);
      if (nw) matched.push({ o, n: nw, sameStops: true });
    }
    // pair the leftovers, most shared stops first
    type Pair = { o: Keyed; n: Keyed; shared: number; share: number };
    const pairs: Pair[] = [];
    for (const o of oldLeft) {
      for (const nw of newLeft) {
        const shared = lcsMatch(o.ids, nw.ids).length;
        const share = shared / Math.max(1, Math.min(o.ids.length, nw.ids.length));
        if (share >= minShare) pairs.push({ o, n: nw, shared, share });
      }
    }
    pairs.sort((x, y) => y.share - x.share || y.shared - x.shared || y.n.p.tripsPerDay - x.n.p.tripsPerDay);
    const usedO = new Set<Keyed>();
    const usedN = new Set<Keyed>();
    const change = (o: Keyed, nw: Keyed, merged: boolean): PatternChange => {
      const m = lcsMatch(o.ids, nw.ids);
      return {
        routeId: nw.p.routeId,
        directionId: nw.p.directionId,
        oldPatternId: o.p.id,
        newPatternId: nw.p.id,
        headsign: nw.p.headsign,
        inserted: nw.ids.filter((_, i) => !m.inB[i]),
        dropped: o.ids.filter((_, i) => !m.inA[i]),
        merged,
      };
    };
    for (const pr of pairs) {
      if (usedO.has(pr.o) || usedN.has(pr.n)) continue;
      usedO.add(pr.o);
      usedN.add(pr.n);
      changed.push(change(pr.o, pr.n, false));
      matched.push({ o: pr.o, n: pr.n, sameStops: false });
    }
    // an old pattern that now equals one that already existed has merged into it; a new one may split off
    // a pattern that stays. Pair each with its closest counterpart among all patterns of the route.
    const closest = (x: Keyed, among: Keyed[]): Keyed | null => {
      let best: Keyed | null = null;
      let bestShare = -1;
      for (const y of among) {
        const share = lcsMatch(x.ids, y.ids).length / Math.max(1, Math.min(x.ids.length, y.ids.length));
        if (share >= minShare && share > bestShare) {
          best = y;
          bestShare = share;
        }
      }
      return best;
    };
    for (const o of oldLeft) {
      if (usedO.has(o)) continue;
      const nw = closest(o, news);
      if (nw) changed.push(change(o, nw, true));
      else removed.push(patternBrief(o));
    }
    for (const nw of newLeft) {
      if (usedN.has(nw)) continue;
      const o = closest(nw, olds);
      if (o) changed.push(change(o, nw, true));
      else added.push(patternBrief(nw));
    }
  }
  const byRoute = <T extends { routeId: string; directionId: number }>(a: T, b: T) =>
    a.routeId < b.routeId ? -1 : a.routeId > b.routeId ? 1 : a.directionId - b.directionId;
  return {
    patterns: { added: added.sort(byRoute), removed: removed.sort(byRoute), changed: changed.sort(byRoute), unchanged },
    pairs: matched,
  };
}

/**
 * What compareFeeds reads of a feed, and no more: the feed with its stop_times cut to each pattern trip's
 * first departure, its trips and shapes dropped (the patterns name their trips). The trips leaving at one time share one row, which holds that
 * time alone (its other fields are those of the first such trip; the comparison reads only the time). The
 * compare command holds the older feed so while it reads the newer one, instead of two whole feeds at once.
 * The trip_ids are keyed as the patterns name them: given comparedPatterns' patterns, by the same own
 * copies, held once.
 */
export function comparedPart(feed: Feed, patterns: PatternSet): Feed {
  const firstRow = new Map<number, TripStopTimes>();
  const stopTimes = new Map<string, TripStopTimes>();
  // what every such row holds alike, held once
  const seq = Int32Array.of(0);
  const shapeDist = Float64Array.of(NaN);
  const timepoint = Uint8Array.of(1);
  const noService = Uint8Array.of(0);
  for (const p of patterns.patterns) {
    for (const id of p.tripIds) {
      const st = feed.stopTimes.get(id);
      if (!st || st.depS.length === 0) continue;
      const t = st.depS[0] >= 0 ? st.depS[0] : st.arrS[0];
      let row = firstRow.get(t);
      if (!row) {
        const one = Int32Array.of(t);
        row = { stopIdx: Int32Array.of(st.stopIdx[0]), seq, arrS: one, depS: one, shapeDist, timepoint, noService };
        firstRow.set(t, row);
      }
      stopTimes.set(id, row);
    }
  }
  return { ...feed, stopTimes, shapes: new Map(), trips: new Map() };
}

/**
 * What compareFeeds reads of the patterns, and no more: each pattern's ids, stops, distances, passenger
 * stops and trips; the map path, per-stop and per-gap times and offsets are left empty, and routesAtStop
 * with them. The trip_ids are own copies: a trip_id read from trips.txt is a piece of a decoded chunk of
 * the table, and while any piece is held its whole chunk is (on a city's network, most of trips.txt).
 */
export function comparedPatterns(set: PatternSet): PatternSet {
  const patterns = set.patterns.map((p): Pattern => ({
    ...p,
    tripIds: p.tripIds.map(ownCopy),
    path: [],
    offsetFromShapeM: [],
    timepoint: [],
    gapRunTimeS: [],
    gapTimeInterpolated: [],
    scheduledDwellS: [],
  }));
  return { date: set.date, patterns, routesAtStop: new Map() };
}

/** Departures from the first stop of each trip of a pattern, seconds, sorted; a trip with frequencies.txt rows departs at each run's start. */
function departures(feed: Feed, p: Pattern, freqByTrip: Map<string, Feed['frequencies']>): number[] {
  const out: number[] = [];
  for (const id of p.tripIds) {
    const rows = freqByTrip.get(id);
    if (rows) {
      for (const f of rows) for (let t = f.startS, k = runsOfFrequency(f); k > 0; k--, t += f.headwayS) out.push(t);
      continue;
    }
    const st = feed.stopTimes.get(id);
    const t = st && st.depS.length > 0 ? (st.depS[0] >= 0 ? st.depS[0] : st.arrS[0]) : -1;
    if (t >= 0) out.push(t);
  }
  return out.sort((a, b) => a - b);
}

function frequenciesByTrip(feed: Feed): Map<string, Feed['frequencies']> {
  const m = new Map<string, Feed['frequencies']>();
  for (const f of feed.frequencies) {
    const list = m.get(f.tripId);
    if (list) list.push(f);
    else m.set(f.tripId, [f]);
  }
  return m;
}

const clockOf = (s: number | undefined): string | null =>
  s === undefined
    ? null
    : `${Math.floor(s / 3600)}:${String(Math.floor((s % 3600) / 60)).padStart(2, '0')}:${String(s % 60).padStart(2, '0')}`;

/** The matched patterns whose trips changed: a different count of trips a day or different departure times. */
function patternTripChanges(
  oldFeed: Feed,
  newFeed: Feed,
  pairs: PatternPair[],
  listCap: number,
): { change: PatternTripChange; sameStops: boolean }[] {
  const fo = frequenciesByTrip(oldFeed);
  const fn = frequenciesByTrip(newFeed);
  const out: { change: PatternTripChange; sameStops: boolean }[] = [];
  for (const { o, n, sameStops } of pairs) {
    const before = departures(oldFeed, o.p, fo);
    const after = departures(newFeed, n.p, fn);
    const same = o.p.tripsPerDay === n.p.tripsPerDay && before.length === after.length && before.every((t, i) => t === after[i]);
    if (same) continue;
    const oldIds = new Set(o.p.tripIds);
    const newIds = new Set(n.p.tripIds);
    const added = n.p.tripIds.filter((id) => !oldIds.has(id));
    const removed = o.p.tripIds.filter((id) => !newIds.has(id));
    out.push({
      sameStops,
      change: {
        routeId: n.p.routeId,
        directionId: n.p.directionId,
        oldPatternId: o.p.id,
        newPatternId: n.p.id,
        headsign: n.p.headsign,
        tripsBefore: o.p.tripsPerDay,
        tripsAfter: n.p.tripsPerDay,
        tripIdsAdded: added.slice(0, listCap),
        tripIdsAddedCount: added.length,
        tripIdsRemoved: removed.slice(0, listCap),
        tripIdsRemovedCount: removed.length,
        firstDeparture: { before: clockOf(before[0]), after: clockOf(after[0]) },
        lastDeparture: { before: clockOf(before[before.length - 1]), after: clockOf(after[after.length - 1]) },
      },
    });
  }
  out.sort(
    (a, b) =>
      relChange(a.change) - relChange(b.change) || (a.change.routeId < b.change.routeId ? -1 : a.change.routeId > b.change.routeId ? 1 : 0),
  );
  return out;
}

const relChange = (x: { tripsBefore: number; tripsAfter: number }): number =>
  x.tripsBefore > 0 ? (x.tripsAfter - x.tripsBefore) / x.tripsBefore : Infinity;

/** Trips a day per route on each side (every pattern of the route), for the routes where they differ; biggest cuts first. */
function routeTripChanges(oldFeed: Feed, newFeed: Feed, oldSet: PatternSet, newSet: PatternSet): RouteTripChange[] {
  const sum = (set: PatternSet) => {
    const m = new Map<string, number>();
    for (const p of set.patterns) m.set(p.routeId, (m.get(p.routeId) ?? 0) + p.tripsPerDay);
    return m;
  };
  const b = sum(oldSet);
  const a = sum(newSet);
  const out: RouteTripChange[] = [];
  for (const routeId of new Set([...b.keys(), ...a.keys()])) {
    const tripsBefore = b.get(routeId) ?? 0;
    const tripsAfter = a.get(routeId) ?? 0;
    if (tripsBefore === tripsAfter) continue;
    const shortName = newFeed.routes.get(routeId)?.shortName ?? oldFeed.routes.get(routeId)?.shortName ?? '';
    out.push({
      routeId,
      shortName,
      tripsBefore,
      tripsAfter,
      changePct: tripsBefore > 0 ? ((tripsAfter - tripsBefore) / tripsBefore) * 100 : null,
    });
  }
  return out.sort((x, y) => relChange(x) - relChange(y) || (x.routeId < y.routeId ? -1 : x.routeId > y.routeId ? 1 : 0));
}

/** What a comparison reads of an audit: a caller may hold this alone while the other feed is read and audited. */
export type AuditBrief = Pick<AuditResult, 'headline' | 'candidates' | 'landUse'>;

/** The parts of an audit a comparison reads (of the land use, the network's figures without the page's density squares), the rest (per stop, gap and pattern) let go. */
export function auditBrief({ headline, candidates, landUse = null }: AuditBrief): AuditBrief {
  return { headline, candidates, landUse: landUse && { ...landUse, density: undefined } };
}

function spacingPicture(set: PatternSet, audit: AuditBrief | undefined): SpacingPicture {
  let trips = 0;
  for (const p of set.patterns) trips += p.tripsPerDay;
  return {
    patterns: set.patterns.length,
    stopsServed: passengerStopsServed(set),
    tripsPerDay: trips,
    medianGapM: medianGapM(set),
    closeStops: audit ? audit.headline.closeStops : null,
    wideGaps: audit ? audit.headline.wideGaps : null,
    paxMinLostPerDay: audit ? audit.headline.paxMinLostPerDay : null,
  };
}

function compareCandidates(before: Candidate[], after: Candidate[]): { appeared: CandidateBrief[]; disappeared: CandidateBrief[] } {
  // a removal is known by its stop; an addition by the gap it fills (its name names both ends) and routes
  const key = (c: Candidate) =>
    c.action === 'remove' ? `remove\u0000${c.stopId}` : `add\u0000${c.stopName}\u0000${[...c.routeIds].sort().join(',')}`;
  const b = new Map(before.map((c) => [key(c), c]));
  const a = new Map(after.map((c) => [key(c), c]));
  const cb = (c: Candidate): CandidateBrief => ({
    action: c.action,
    stopId: c.stopId,
    stopName: c.stopName,
    routeIds: c.routeIds,
    netPaxMinPerDay: c.netPaxMinPerDay,
  });
  return {
    appeared: [...a].filter(([k]) => !b.has(k)).map(([, c]) => cb(c)),
    disappeared: [...b].filter(([k]) => !a.has(k)).map(([, c]) => cb(c)),
  };
}
