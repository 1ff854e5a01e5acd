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
  const {
    warnings = new WarningSink(),
    onProgress,
    minTrips = 3,
    minDwellS = 1,
    passMaxGapS = 10,
    dwellFixedQuantile = 0.1,
    maxGapSpeedMps = 40,
    measuredOnly = true,
  } = options;
  if (!(Number.isInteger(minTrips) && minTrips >= 1)) {
    throw new StopspanError('bad-option', 'invalid option minTrips: expected an integer of at least 1', { value: String(minTrips) });
  }
  if (!(minDwellS >= 0)) throw new StopspanError('bad-option', 'invalid option minDwellS: expected a number >= 0', { value: String(minDwellS) });
  if (!(passMaxGapS >= 0)) throw new StopspanError('bad-option', 'invalid option passMaxGapS: expected a number >= 0', { value: String(passMaxGapS) });
  if (!(dwellFixedQuantile >= 0 && dwellFixedQuantile <= 1)) {
    throw new StopspanError('bad-option', 'invalid option dwellFixedQuantile: expected a number in [0, 1]', { value: String(dwellFixedQuantile) });
  }
  if (!(maxGapSpeedMps > 0)) throw new StopspanError('bad-option', 'invalid option maxGapSpeedMps: expected a positive number', { value: String(maxGapSpeedMps) });

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

  // static side: trip -> pattern, stop times, frequencies
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

  const instances = new Map<string, Instance>();
  const unmatched = new Set<string>();
  const stats: ArchiveStats = { filesSeen: 0, snapshotsRead: 0, snapshotsSkipped: 0 };
  let otherFeedSnapshots = 0;
  let vpIntervalSumS = 0; // time between consecutive VehiclePositions of the same trip instance
  let vpIntervals = 0;
  let firstS = Infinity;
  let lastS = -Infinity;

  function unmatchedTrip(key: string, code: WarningCode): null {
    if (!unmatched.has(key)) {
      unmatched.add(key);
      warnings.add(code, key);
    }
    return null;
  }

  function instanceFor(td: ITripDescriptor, atS: number): Instance | null {
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
      return unmatchedTrip(rawKey, 'realtime-trip-added');
    }
    const info = tripInfo.get(tripId);
    if (!info) {
      return feed.trips.has(tripId)
        ? unmatchedTrip(rawKey, 'realtime-trip-not-in-patterns')
        : unmatchedTrip(rawKey, 'realtime-trip-unknown');
    }
    // frequency-based trips: start_time picks the instance and shifts the schedule
    let shiftS = 0;
    if (info.freqs.length > 0) {
      const t0 = parseGtfsTime(startTime);
      if (t0 === null) return unmatchedTrip(rawKey, 'realtime-frequency-no-start-time');
      const fits = info.freqs.some((f) => t0 >= f.startS && t0 < f.endS && (f.exactTimes === 0 || (t0 - f.startS) % f.headwayS === 0));
      if (!fits) return unmatchedTrip(rawKey, 'realtime-frequency-start-mismatch');
      shiftS = t0 - firstTime(info.st);
    }
    let date = startDate;
    if (date) {
      if (!/^\d{8}$/.test(date)) return unmatchedTrip(rawKey, 'realtime-bad-start-date');
      if (!serviceRunsOn(info.serviceId, date, feed.calendar, feed.calendarDates)) {
        return unmatchedTrip(rawKey, 'realtime-date-mismatch');
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
      if (!date) return unmatchedTrip(rawKey, 'realtime-date-unknown');
    }
    const key = `${tripId}|${date}|${info.freqs.length > 0 ? startTime : ''}`;
    let inst = instances.get(key);
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
      instances.set(key, inst);
    }
    return inst;
  }

  for await (const snap of readArchive(archivePath, { warnings, stats, onProgress })) {
    const entities = snap.message.entity ?? [];
    // a snapshot none of whose trips the static feed knows belongs to another feed version
    let withTrip = 0;
    let known = 0;
    for (const e of entities) {
      const id = e.tripUpdate?.trip?.tripId || e.vehicle?.trip?.tripId;
      if (!id) continue;
      withTrip++;
      if (feed.trips.has(id)) known++;
    }
    if (withTrip > 0 && known === 0) {
      otherFeedSnapshots++;
      warnings.add('realtime-other-feed', snap.name);
      continue;
    }
    firstS = Math.min(firstS, snap.timestampS);
    lastS = Math.max(lastS, snap.timestampS);
    for (const e of entities) {
      const tu = e.tripUpdate;
      if (tu) {
        if (!tu.trip) {
          warnings.add('realtime-trip-without-id', e.id);
          continue;
        }
        const inst = instanceFor(tu.trip, snap.timestampS);
        if (!inst) continue;
        const atS = longToNumber(tu.timestamp as never) || snap.timestampS;
        if (atS < inst.state.lastTripUpdateS) {
          warnings.add('realtime-out-of-order', `${tu.trip.tripId}@${atS}`);
          continue;
        }
        if (atS === inst.state.lastTripUpdateS) continue; // the same report repeated in the next snapshot
        const events = resolveStopTimeUpdates(tu.stopTimeUpdate ?? [], inst.sched, inst.originS);
        if (events.unplaced > 0) {
          warnings.add('realtime-update-unplaced', tu.trip.tripId ?? '', events.unplaced);
        }
        observeTripUpdate(inst.state, events, atS);
      }
      const vp = e.vehicle;
      if (vp) {
        if (!vp.trip || !vp.trip.tripId) {
          warnings.add('realtime-vehicle-without-trip', vp.vehicle?.id ?? e.id);
          continue;
        }
        const inst = instanceFor(vp.trip, snap.timestampS);
        if (!inst) continue;
        const atS = longToNumber(vp.timestamp as never) || snap.timestampS;
        if (atS < inst.state.lastVehicleS) {
          warnings.add('realtime-out-of-order', `${vp.trip.tripId}@${atS}`);
          continue;
        }
        if (atS === inst.state.lastVehicleS) continue;
        let pos = -1;
        const n = inst.sched.seq.length;
        if (hasField(vp, 'currentStopSequence')) {
          for (let i = 0; i < n; i++) if (inst.sched.seq[i] === vp.currentStopSequence) pos = i;
        } else if (vp.stopId) {
          for (let i = Math.max(inst.state.prevPos, 0); i < n && pos < 0; i++) if (inst.sched.stopIds[i] === vp.stopId) pos = i;
        }
        if (pos < 0) {
          warnings.add('realtime-vehicle-unplaced', vp.trip.tripId);
          continue;
        }
        const stopped = vp.currentStatus === rt.VehiclePosition.VehicleStopStatus.STOPPED_AT;
        if (Number.isFinite(inst.state.prevT)) {
          vpIntervalSumS += atS - inst.state.prevT;
          vpIntervals++;
        }
        observeVehiclePosition(inst.state, pos, stopped, atS);
      }
    }
  }
  if (stats.filesSeen === 0) {
    throw new StopspanError('bad-realtime', 'realtime archive holds no files', { file: archivePath });
  }

  // per pattern aggregates
  interface Agg {
    trips: number;
    stopped: number[];
    observed: number[];
    passedUnknown: number[];
    dwells: number[][];
    runs: number[][];
    fit: RunTimeFit;
  }
  const aggs = new Map<string, Agg>();
  const vopts = { minDwellS, passMaxGapS, measuredOnly };
  let implausible = 0;
  let vpDwells = 0;
  let tuDwells = 0;
  let predictedOnly = 0; // stop events whose last report was still a prediction
  for (const inst of instances.values()) {
    const p = inst.info.pattern;
    const n = p.stopIdx.length;
    let agg = aggs.get(p.id);
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
      aggs.set(p.id, agg);
    }
    agg.trips++;
    for (let i = 0; i < n; i++) {
      if (Number.isFinite(inst.state.arrS[i]) && !inst.state.arrMeasured[i]) predictedOnly++;
      if (Number.isFinite(inst.state.depS[i]) && !inst.state.depMeasured[i]) predictedOnly++;
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
      if (v.dwellFrom === 'vehicle-position') vpDwells++;
      else if (v.dwellFrom === 'trip-update') tuDwells++;
      agg.observed[i]++;
      if (terminal || v.stopped) agg.stopped[i]++;
      if (!terminal && v.stopped && v.dwellS !== null && v.dwellS >= 0) agg.dwells[i].push(v.dwellS);
    }
    for (let g = 0; g < n - 1; g++) {
      const t = gapRunTime(inst.state, g, measuredOnly);
      if (t === null) continue;
      const gapM = p.distAlongM[g + 1] - p.distAlongM[g];
      if (!(t > 0) || gapM / t > maxGapSpeedMps) {
        implausible++;
        continue;
      }
      agg.runs[g].push(t);
      const a = served[g];
      const b = served[g + 1];
      if (a !== null && b !== null) agg.fit.add(gapM, t, (a ? 1 : 0) + (b ? 1 : 0));
    }
  }
  if (implausible > 0) {
    warnings.add('realtime-implausible-run-time', undefined, implausible, { maxMps: maxGapSpeedMps });
  }

  if (predictedOnly > 0) {
    warnings.add('realtime-predicted-only', undefined, predictedOnly, { use: measuredOnly ? 'not used' : 'used as measured, as asked' });
  }
  const meanVpIntervalS = vpIntervals > 0 ? vpIntervalSumS / vpIntervals : NaN;
  if (vpDwells > 0 && meanVpIntervalS > passMaxGapS) {
    warnings.add('realtime-coarse-polling', undefined, 1, { fromVp: vpDwells, all: vpDwells + tuDwells, intervalS: Math.round(meanVpIntervalS) });
  }
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
      warnings.add(
        'realtime-fit-rejected',
        `${p.id}: ${solved.cruiseSpeedMps.toFixed(2)} m/s, ${solved.lossPerStopS.toFixed(2)} s`,
      );
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
  return {
    source: archivePath,
    snapshotsRead: stats.snapshotsRead - otherFeedSnapshots,
    snapshotsSkipped: stats.snapshotsSkipped + otherFeedSnapshots,
    tripsMatched: instances.size,
    tripsUnmatched: unmatched.size,
    byPattern,
    warnings: warnings.list(),
    firstTimestampS: Number.isFinite(firstS) ? firstS : null,
    lastTimestampS: Number.isFinite(lastS) ? lastS : null,
  };
}
