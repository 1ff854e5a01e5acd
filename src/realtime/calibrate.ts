// observeArchive: reads a GTFS-Realtime archive against the static feed and its patterns and derives,
// per pattern, what the model otherwise assumes: observed dwell, run time per gap, the cruise speed
// and lost time per stop that explain them, and the share of trips that stopped at each stop.

import GtfsRealtimeBindings from 'gtfs-realtime-bindings';
import { StopspanError } from '../common/errors.js';
import { median } from '../common/median.js';
import type { OnProgress } from '../common/progress.js';
import { WarningSink } from '../common/warnings.js';
import type { WarningCode } from '../common/warningCodes.js';
import type { Feed, Frequency, TripStopTimes } from '../gtfs/types.js';
import type { Pattern, PatternSet } from '../network/types.js';
import { longToNumber, readArchive, type ArchiveStats } from './archive.js';
import { RunTimeFit } from './fitRunTimes.js';
import { gapRunTime, observeTripUpdate, observeVehiclePosition, stopVerdict, TripInstanceState } from './observe.js';
import { hasField, resolveStopTimeUpdates, type TripSchedule } from './resolveStopTimeUpdates.js';
import { addDays, localDate, parseGtfsTime, serviceDayOriginS, serviceRunsOn } from './serviceDay.js';
import type { ObservedData, ObservedPattern } from './types.js';

const rt = GtfsRealtimeBindings.transit_realtime;
type ITripDescriptor = GtfsRealtimeBindings.transit_realtime.ITripDescriptor;
type IFeedEntity = GtfsRealtimeBindings.transit_realtime.IFeedEntity;

export interface ObserveArchiveOptions {
  warnings?: WarningSink;
  onProgress?: OnProgress;
  /** Fewest observed trips for a per-stop share, dwell or per-gap run time (else null). */
  minTrips?: number;
  /** A TripUpdate dwell (departure - arrival) of at least this many seconds means the bus stopped. */
  minDwellS?: number;
  /** A VehiclePosition pass counts as "did not stop" only when its bracketing observations are at most this far apart. */
  passMaxGapS?: number;
  /** Quantile of observed dwells taken as the fixed (door) part of dwell in the lost time per stop. */
  dwellFixedQuantile?: number;
  /** Use TripUpdate times only once they were in the past when reported (default true); false also accepts the last prediction. */
  measuredOnly?: boolean;
  /** Largest plausible speed over a gap, m/s; faster run times are counted and dropped. */
  maxGapSpeedMps?: number;
}

interface TripInfo {
  pattern: Pattern;
  serviceId: string;
  st: TripStopTimes;
  stopIds: string[];
  freqs: Frequency[];
}

interface Instance {
  info: TripInfo;
  state: TripInstanceState;
  sched: TripSchedule;
  originS: number;
}

function quantile(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  const pos = (s.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return s[lo] + (s[hi] - s[lo]) * (pos - lo);
}

function firstTime(st: TripStopTimes): number {
  for (let i = 0; i < st.depS.length; i++) if (st.depS[i] >= 0) return st.depS[i];
  for (let i = 0; i < st.arrS.length; i++) if (st.arrS[i] >= 0) return st.arrS[i];
  return 0;
}

function lastTime(st: TripStopTimes): number {
  for (let i = st.arrS.length - 1; i >= 0; i--) if (st.arrS[i] >= 0) return st.arrS[i];
  for (let i = st.depS.length - 1; i >= 0; i--) if (st.depS[i] >= 0) return st.depS[i];
  return 0;
}

function shifted(a: Int32Array, by: number): Int32Array {
  const out = new Int32Array(a.length);
  for (let i = 0; i < a.length; i++) out[i] = a[i] >= 0 ? a[i] + by : -1;
  return out;
}

/** The options that shape what is counted as observed, checked. */
type ObserveSettings = Required<
  Pick<ObserveArchiveOptions, 'minTrips' | 'minDwellS' | 'passMaxGapS' | 'dwellFixedQuantile' | 'maxGapSpeedMps' | 'measuredOnly'>
>;

/** What reading the snapshots gathered besides the trip instances. */
interface ReadTally {
  stats: ArchiveStats;
  otherFeedSnapshots: number;
  vpIntervalSumS: number; // time between consecutive VehiclePositions of the same trip instance
  vpIntervals: number;
  firstS: number;
  lastS: number;
}

/** One pattern's observations summed over its trip instances. */
interface Agg {
  trips: number;
  stopped: number[];
  observed: number[];
  passedUnknown: number[];
  dwells: number[][];
  runs: number[][];
  fit: RunTimeFit;
}

/** The per-pattern sums, and the counts their warnings report. */
interface Aggregates {
  aggs: Map<string, Agg>;
  implausible: number;
  vpDwells: number;
  tuDwells: number;
  predictedOnly: number; // stop events whose last report was still a prediction
}

/**
 * Reads the archive at archivePath (folder or zip of GTFS-Realtime snapshots) and returns, per pattern
 * of `patterns`, the observed dwell, run time per gap, cruise speed, lost time per stop and stopping
 * share. Trip instances are matched by trip_id and start_date (inferred from the snapshot time when
 * absent), and start_time for frequency-based trips; what cannot be matched is counted.
 */
export async function observeArchive(
  archivePath: string,
  feed: Feed,
  patterns: PatternSet,
  options: ObserveArchiveOptions = {},
): Promise<ObservedData> {
  const { warnings = new WarningSink(), onProgress } = options;
  const settings = observeSettings(options);
  const matcher = new TripMatcher(feed, tripInfoOf(feed, patterns, warnings), feedTimeZone(feed, warnings), warnings);
  const read = await readObservations(archivePath, feed, matcher, warnings, onProgress);
  if (read.stats.filesSeen === 0) {
    throw new StopspanError('bad-realtime', 'realtime archive holds no files', { file: archivePath });
  }
  const aggregates = aggregateInstances(matcher.instances.values(), settings);
  warnAggregates(aggregates, read, settings, warnings);
  const byPattern = observedPatterns(patterns, aggregates.aggs, settings, warnings);
  return {
    source: archivePath,
    snapshotsRead: read.stats.snapshotsRead - read.otherFeedSnapshots,
    snapshotsSkipped: read.stats.snapshotsSkipped + read.otherFeedSnapshots,
    tripsMatched: matcher.instances.size,
    tripsUnmatched: matcher.unmatched.size,
    byPattern,
    warnings: warnings.list(),
    firstTimestampS: Number.isFinite(read.firstS) ? read.firstS : null,
    lastTimestampS: Number.isFinite(read.lastS) ? read.lastS : null,
  };
}

/** The options with their defaults, each checked. */
function observeSettings(options: ObserveArchiveOptions): ObserveSettings {
  const { minTrips = 3, minDwellS = 1, passMaxGapS = 10, dwellFixedQuantile = 0.1, maxGapSpeedMps = 40, measuredOnly = true } = options;
  if (!(Number.isInteger(minTrips) && minTrips >= 1)) {
    throw new StopspanError('bad-option', 'invalid option minTrips: expected an integer of at least 1', { value: String(minTrips) });
  }
  if (!(minDwellS >= 0))
    throw new StopspanError('bad-option', 'invalid option minDwellS: expected a number >= 0', { value: String(minDwellS) });
  if (!(passMaxGapS >= 0))
    throw new StopspanError('bad-option', 'invalid option passMaxGapS: expected a number >= 0', { value: String(passMaxGapS) });
  if (!(dwellFixedQuantile >= 0 && dwellFixedQuantile <= 1)) {
    throw new StopspanError('bad-option', 'invalid option dwellFixedQuantile: expected a number in [0, 1]', {
      value: String(dwellFixedQuantile),
    });
  }
  if (!(maxGapSpeedMps > 0))
    throw new StopspanError('bad-option', 'invalid option maxGapSpeedMps: expected a positive number', { value: String(maxGapSpeedMps) });
  return { minTrips, minDwellS, passMaxGapS, dwellFixedQuantile, maxGapSpeedMps, measuredOnly };
}

/** The feed's time zone (its first agency's), or UTC with a warning when it has none a clock knows. */
function feedTimeZone(feed: Feed, warnings: WarningSink): string {
  let timeZone = feed.agencies[0]?.timezone || '';
  try {
    new Intl.DateTimeFormat('en-US', { timeZone });
  } catch {
    timeZone = '';
  }
  if (!timeZone) {
    warnings.add('realtime-no-timezone', feed.agencies[0]?.timezone ?? '');
    timeZone = 'UTC';
  }
  return timeZone;
}

/** The static side: each patterned trip's pattern, stop times and frequencies (a trip off its pattern's stops left out). */
function tripInfoOf(feed: Feed, patterns: PatternSet, warnings: WarningSink): Map<string, TripInfo> {
  const freqByTrip = new Map<string, Frequency[]>();
  for (const f of feed.frequencies) {
    const l = freqByTrip.get(f.tripId);
    if (l) l.push(f);
    else freqByTrip.set(f.tripId, [f]);
  }
  const tripInfo = new Map<string, TripInfo>();
  for (const p of patterns.patterns) {
    for (const tripId of p.tripIds) {
      const st = feed.stopTimes.get(tripId);
      const trip = feed.trips.get(tripId);
      if (!st || !trip) continue;
      if (st.stopIdx.length !== p.stopIdx.length || st.stopIdx.some((s, i) => s !== p.stopIdx[i])) {
        warnings.add('realtime-pattern-mismatch', tripId);
        continue;
      }
      tripInfo.set(tripId, {
        pattern: p,
        serviceId: trip.serviceId,
        st,
        stopIds: Array.from(st.stopIdx, (s) => feed.stops[s]?.id ?? ''),
        freqs: freqByTrip.get(tripId) ?? [],
      });
    }
  }
  return tripInfo;
}

/** Matches a realtime trip descriptor to one trip instance (trip, service day, start time), counting what does not match. */
class TripMatcher {
  readonly instances = new Map<string, Instance>();
  readonly unmatched = new Set<string>();

  constructor(
    private readonly feed: Feed,
    private readonly tripInfo: Map<string, TripInfo>,
    private readonly timeZone: string,
    private readonly warnings: WarningSink,
  ) {}

  private unmatchedTrip(key: string, code: WarningCode): null {
    if (!this.unmatched.has(key)) {
      this.unmatched.add(key);
      this.warnings.add(code, key);
    }
    return null;
  }

  instanceFor(td: ITripDescriptor, atS: number): Instance | null {
    const { feed, timeZone, warnings } = this;
    const tripId = td.tripId ?? '';
    if (!tripId) {
      warnings.add('realtime-trip-without-id');
      return null;
    }
    const rel = td.scheduleRelationship ?? rt.TripDescriptor.ScheduleRelationship.SCHEDULED;
    if (rel === rt.TripDescriptor.ScheduleRelationship.CANCELED) return null;
    const startDate = td.startDate ?? '';
    const startTime = td.startTime ?? '';
    const rawKey = `${tripId}|${startDate}|${startTime}`;
    if (rel === rt.TripDescriptor.ScheduleRelationship.ADDED) {
      return this.unmatchedTrip(rawKey, 'realtime-trip-added');
    }
    const info = this.tripInfo.get(tripId);
    if (!info) {
      return feed.trips.has(tripId)
        ? this.unmatchedTrip(rawKey, 'realtime-trip-not-in-patterns')
        : this.unmatchedTrip(rawKey, 'realtime-trip-unknown');
    }
    // frequency-based trips: start_time picks the instance and shifts the schedule
    let shiftS = 0;
    if (info.freqs.length > 0) {
      const t0 = parseGtfsTime(startTime);
      if (t0 === null) return this.unmatchedTrip(rawKey, 'realtime-frequency-no-start-time');
      const fits = info.freqs.some((f) => t0 >= f.startS && t0 < f.endS && (f.exactTimes === 0 || (t0 - f.startS) % f.headwayS === 0));
      if (!fits) return this.unmatchedTrip(rawKey, 'realtime-frequency-start-mismatch');
      shiftS = t0 - firstTime(info.st);
    }
    let date = startDate;
    if (date) {
      if (!/^\d{8}$/.test(date)) return this.unmatchedTrip(rawKey, 'realtime-bad-start-date');
      if (!serviceRunsOn(info.serviceId, date, feed.calendar, feed.calendarDates)) {
        return this.unmatchedTrip(rawKey, 'realtime-date-mismatch');
      }
    } else {
      const today = localDate(atS, timeZone);
      date = '';
      for (const cand of [today, addDays(today, -1)]) {
        if (!serviceRunsOn(info.serviceId, cand, feed.calendar, feed.calendarDates)) continue;
        const o = serviceDayOriginS(cand, timeZone);
        if (atS >= o + firstTime(info.st) + shiftS - 3600 && atS <= o + lastTime(info.st) + shiftS + 3 * 3600) {
          date = cand;
          break;
        }
      }
      if (!date) return this.unmatchedTrip(rawKey, 'realtime-date-unknown');
    }
    const key = `${tripId}|${date}|${info.freqs.length > 0 ? startTime : ''}`;
    let inst = this.instances.get(key);
    if (!inst) {
      inst = {
        info,
        state: new TripInstanceState(info.st.stopIdx.length),
        sched: {
          seq: info.st.seq,
          stopIds: info.stopIds,
          schedArrS: shiftS ? shifted(info.st.arrS, shiftS) : info.st.arrS,
          schedDepS: shiftS ? shifted(info.st.depS, shiftS) : info.st.depS,
        },
        originS: serviceDayOriginS(date, timeZone),
      };
      this.instances.set(key, inst);
    }
    return inst;
  }
}

/** Every snapshot of the archive, in time order, folded into the trip instances it reports on. */
async function readObservations(
  archivePath: string,
  feed: Feed,
  matcher: TripMatcher,
  warnings: WarningSink,
  onProgress: OnProgress | undefined,
): Promise<ReadTally> {
  const read: ReadTally = {
    stats: { filesSeen: 0, snapshotsRead: 0, snapshotsSkipped: 0 },
    otherFeedSnapshots: 0,
    vpIntervalSumS: 0,
    vpIntervals: 0,
    firstS: Infinity,
    lastS: -Infinity,
  };
  for await (const snap of readArchive(archivePath, { warnings, stats: read.stats, onProgress })) {
    const entities = snap.message.entity ?? [];
    if (isOtherFeed(entities, feed)) {
      read.otherFeedSnapshots++;
      warnings.add('realtime-other-feed', snap.name);
      continue;
    }
    read.firstS = Math.min(read.firstS, snap.timestampS);
    read.lastS = Math.max(read.lastS, snap.timestampS);
    for (const e of entities) {
      // an entity whose TripUpdate cannot be used is passed over whole, its VehiclePosition too
      if (e.tripUpdate && !observeUpdate(e, snap.timestampS, matcher, warnings)) continue;
      if (e.vehicle) observePosition(e, snap.timestampS, matcher, read, warnings);
    }
  }
  return read;
}

/** A snapshot none of whose trips the static feed knows belongs to another feed version. */
function isOtherFeed(entities: IFeedEntity[], feed: Feed): boolean {
  let withTrip = 0;
  let known = 0;
  for (const e of entities) {
    const id = e.tripUpdate?.trip?.tripId || e.vehicle?.trip?.tripId;
    if (!id) continue;
    withTrip++;
    if (feed.trips.has(id)) known++;
  }
  return withTrip > 0 && known === 0;
}

/** An entity's TripUpdate folded into its trip instance; false when it could not be used. */
function observeUpdate(e: IFeedEntity, snapS: number, matcher: TripMatcher, warnings: WarningSink): boolean {
  const tu = e.tripUpdate!;
  if (!tu.trip) {
    warnings.add('realtime-trip-without-id', e.id);
    return false;
  }
  const inst = matcher.instanceFor(tu.trip, snapS);
  if (!inst) return false;
  const atS = longToNumber(tu.timestamp as never) || snapS;
  if (atS < inst.state.lastTripUpdateS) {
    warnings.add('realtime-out-of-order', `${tu.trip.tripId}@${atS}`);
    return false;
  }
  if (atS === inst.state.lastTripUpdateS) return false; // the same report repeated in the next snapshot
  const events = resolveStopTimeUpdates(tu.stopTimeUpdate ?? [], inst.sched, inst.originS);
  if (events.unplaced > 0) {
    warnings.add('realtime-update-unplaced', tu.trip.tripId ?? '', events.unplaced);
  }
  observeTripUpdate(inst.state, events, atS);
  return true;
}

/** An entity's VehiclePosition placed on its trip's stops and folded into the instance; the polling interval tallied. */
function observePosition(e: IFeedEntity, snapS: number, matcher: TripMatcher, read: ReadTally, warnings: WarningSink): void {
  const vp = e.vehicle!;
  if (!vp.trip || !vp.trip.tripId) {
    warnings.add('realtime-vehicle-without-trip', vp.vehicle?.id ?? e.id);
    return;
  }
  const inst = matcher.instanceFor(vp.trip, snapS);
  if (!inst) return;
  const atS = longToNumber(vp.timestamp as never) || snapS;
  if (atS < inst.state.lastVehicleS) {
    warnings.add('realtime-out-of-order', `${vp.trip.tripId}@${atS}`);
    return;
  }
  if (atS === inst.state.lastVehicleS) return;
  let pos = -1;
  const n = inst.sched.seq.length;
  if (hasField(vp, 'currentStopSequence')) {
    for (let i = 0; i < n; i++) if (inst.sched.seq[i] === vp.currentStopSequence) pos = i;
  } else if (vp.stopId) {
    for (let i = Math.max(inst.state.prevPos, 0); i < n && pos < 0; i++) if (inst.sched.stopIds[i] === vp.stopId) pos = i;
  }
  if (pos < 0) {
    warnings.add('realtime-vehicle-unplaced', vp.trip.tripId);
    return;
  }
  const stopped = vp.currentStatus === rt.VehiclePosition.VehicleStopStatus.STOPPED_AT;
  if (Number.isFinite(inst.state.prevT)) {
    read.vpIntervalSumS += atS - inst.state.prevT;
    read.vpIntervals++;
  }
  observeVehiclePosition(inst.state, pos, stopped, atS);
}

/** Per pattern aggregates: each trip instance's stop verdicts, dwells and gap run times summed on its pattern. */
function aggregateInstances(
  instances: Iterable<Instance>,
  { minDwellS, passMaxGapS, measuredOnly, maxGapSpeedMps }: ObserveSettings,
): Aggregates {
  const out: Aggregates = { aggs: new Map(), implausible: 0, vpDwells: 0, tuDwells: 0, predictedOnly: 0 };
  const vopts = { minDwellS, passMaxGapS, measuredOnly };
  for (const inst of instances) {
    const p = inst.info.pattern;
    const n = p.stopIdx.length;
    let agg = out.aggs.get(p.id);
    if (!agg) {
      agg = {
        trips: 0,
        stopped: new Array(n).fill(0),
        observed: new Array(n).fill(0),
        passedUnknown: new Array(n).fill(0),
        dwells: Array.from({ length: n }, () => []),
        runs: Array.from({ length: Math.max(n - 1, 0) }, () => []),
        fit: new RunTimeFit(),
      };
      out.aggs.set(p.id, agg);
    }
    agg.trips++;
    for (let i = 0; i < n; i++) {
      if (Number.isFinite(inst.state.arrS[i]) && !inst.state.arrMeasured[i]) out.predictedOnly++;
      if (Number.isFinite(inst.state.depS[i]) && !inst.state.depMeasured[i]) out.predictedOnly++;
    }
    const served: (boolean | null)[] = new Array(n);
    for (let i = 0; i < n; i++) {
      // terminals are always served; their "dwell" is layover, so it is not counted
      const v = stopVerdict(inst.state, i, vopts);
      const terminal = i === 0 || i === n - 1;
      served[i] = terminal ? true : v.stopped;
      if (v.stopped === null) {
        // seen on both sides of the stop, but too far apart to tell a pass from a short dwell
        if (Number.isFinite(inst.state.passGapS[i])) agg.passedUnknown[i]++;
        continue;
      }
      if (v.dwellFrom === 'vehicle-position') out.vpDwells++;
      else if (v.dwellFrom === 'trip-update') out.tuDwells++;
      agg.observed[i]++;
      if (terminal || v.stopped) agg.stopped[i]++;
      if (!terminal && v.stopped && v.dwellS !== null && v.dwellS >= 0) agg.dwells[i].push(v.dwellS);
    }
    for (let g = 0; g < n - 1; g++) {
      const t = gapRunTime(inst.state, g, measuredOnly);
      if (t === null) continue;
      const gapM = p.distAlongM[g + 1] - p.distAlongM[g];
      if (!(t > 0) || gapM / t > maxGapSpeedMps) {
        out.implausible++;
        continue;
      }
      agg.runs[g].push(t);
      const a = served[g];
      const b = served[g + 1];
      if (a !== null && b !== null) agg.fit.add(gapM, t, (a ? 1 : 0) + (b ? 1 : 0));
    }
  }
  return out;
}

/** The archive-wide warnings: implausible run times, predictions only, polling too coarse to see short dwells. */
function warnAggregates(
  a: Aggregates,
  read: ReadTally,
  { maxGapSpeedMps, measuredOnly, passMaxGapS }: ObserveSettings,
  warnings: WarningSink,
): void {
  if (a.implausible > 0) {
    warnings.add('realtime-implausible-run-time', undefined, a.implausible, { maxMps: maxGapSpeedMps });
  }

  if (a.predictedOnly > 0) {
    warnings.add('realtime-predicted-only', undefined, a.predictedOnly, { use: measuredOnly ? 'not used' : 'used as measured, as asked' });
  }
  const meanVpIntervalS = read.vpIntervals > 0 ? read.vpIntervalSumS / read.vpIntervals : NaN;
  if (a.vpDwells > 0 && meanVpIntervalS > passMaxGapS) {
    warnings.add('realtime-coarse-polling', undefined, 1, {
      fromVp: a.vpDwells,
      all: a.vpDwells + a.tuDwells,
      intervalS: Math.round(meanVpIntervalS),
    });
  }
}

/** Each observed pattern's figures: dwell, door time and stop loss from the run-time fit, shares, run times. */
function observedPatterns(
  patterns: PatternSet,
  aggs: Map<string, Agg>,
  { minTrips, dwellFixedQuantile, passMaxGapS }: ObserveSettings,
  warnings: WarningSink,
): Map<string, ObservedPattern> {
  let unidentified = 0;
  const byPattern = new Map<string, ObservedPattern>();
  for (const p of patterns.patterns) {
    const agg = aggs.get(p.id);
    if (!agg) continue;
    const allDwells = agg.dwells.flat();
    const solved = agg.fit.solve();
    if (!solved && agg.fit.count > 0) {
      warnings.add('realtime-fit-failed', p.id);
    }
    // a fit whose stop loss is negative (buses quicker over gaps where they stop) explains nothing: both
    // its cruise speed and its stop loss are dropped, not the loss alone
    const fit = solved && solved.lossPerStopS >= 0 ? solved : null;
    if (solved && !fit) {
      warnings.add('realtime-fit-rejected', `${p.id}: ${solved.cruiseSpeedMps.toFixed(2)} m/s, ${solved.lossPerStopS.toFixed(2)} s`);
    }
    const dwellFixedS = allDwells.length >= minTrips ? quantile(allDwells, dwellFixedQuantile) : null;
    byPattern.set(p.id, {
      patternId: p.id,
      tripsObserved: agg.trips,
      meanDwellS: allDwells.length >= minTrips ? allDwells.reduce((s, x) => s + x, 0) / allDwells.length : null,
      lostTimePerStopS: dwellFixedS !== null && fit ? dwellFixedS + fit.lossPerStopS : null,
      cruiseSpeedMps: fit ? fit.cruiseSpeedMps : null,
      // a share is left unset where more than a tenth of the passing trips could not be told apart
      stopShare: agg.observed.map((o, i) => {
        if (o < minTrips) return null;
        if (agg.passedUnknown[i] > 0.1 * (o + agg.passedUnknown[i])) {
          unidentified++;
          return null;
        }
        return agg.stopped[i] / o;
      }),
      gapRunTimeS: agg.runs.map((r) => (r.length >= minTrips ? median(r) : null)),
      stopDwellS: agg.dwells.map((d) => (d.length >= minTrips ? median(d) : null)),
      stopsObserved: agg.observed,
      dwellFixedS,
      stopLossS: fit ? fit.lossPerStopS : null,
      gapsFitted: agg.fit.count,
    });
  }

  if (unidentified > 0) {
    warnings.add('realtime-share-unidentified', undefined, unidentified, { stops: unidentified, passMaxGapS });
  }
  return byPattern;
}
