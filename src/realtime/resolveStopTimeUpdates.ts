// Turns one TripUpdate's StopTimeUpdates into arrival and departure instants for every stop of the
// scheduled trip, applying the GTFS-Realtime delay-propagation rules, so delay-only and NO_DATA updates
// mean what the spec says they mean.

import GtfsRealtimeBindings from 'gtfs-realtime-bindings';
import { longToNumber } from './archive.js';

const StuRel = GtfsRealtimeBindings.transit_realtime.TripUpdate.StopTimeUpdate.ScheduleRelationship;
type IStopTimeUpdate = GtfsRealtimeBindings.transit_realtime.TripUpdate.IStopTimeUpdate;
type IStopTimeEvent = GtfsRealtimeBindings.transit_realtime.TripUpdate.IStopTimeEvent;

/** The static side of one trip instance, in stop order. */
export interface TripSchedule {
  seq: Int32Array; // stop_sequence per stop position
  stopIds: string[]; // stop_id per stop position
  schedArrS: Int32Array; // scheduled arrival, seconds of the service day; -1 where blank
  schedDepS: Int32Array; // scheduled departure, seconds of the service day; -1 where blank
}

/** How a stop's times were obtained. */
export const EVENT_UNKNOWN = 0; // no realtime information (before the first update, or after NO_DATA)
export const EVENT_EXPLICIT = 1; // a StopTimeUpdate names this stop (time, or delay on the schedule)
export const EVENT_PROPAGATED = 2; // delay carried from the previous StopTimeUpdate
export const EVENT_SKIPPED = 3; // SKIPPED: the vehicle will not serve the stop

export interface StopEvents {
  arrS: Float64Array; // POSIX seconds, NaN where unknown
  depS: Float64Array;
  source: Uint8Array; // EVENT_* per stop position
  unplaced: number; // StopTimeUpdates that matched no stop of the trip
}

/** True when a decoded protobuf message carries the field itself (decoded messages show defaults through the prototype). */
export function hasField(msg: object | null | undefined, field: string): boolean {
  if (!msg) return false;
  const v = (msg as Record<string, unknown>)[field];
  return Object.prototype.hasOwnProperty.call(msg, field) && v !== null && v !== undefined;
}

function eventTime(ev: IStopTimeEvent | null | undefined, schedS: number, originS: number): { t: number; delay: number } | null {
  if (!ev) return null;
  const time = longToNumber(ev.time as never);
  const hasTime = hasField(ev, 'time') && time !== 0;
  const hasDelay = hasField(ev, 'delay');
  if (hasTime) return { t: time, delay: schedS >= 0 ? time - (originS + schedS) : NaN };
  if (hasDelay && schedS >= 0) return { t: originS + schedS + (ev.delay as number), delay: ev.delay as number };
  if (hasDelay) return { t: NaN, delay: ev.delay as number };
  return null;
}

/**
 * Arrival and departure per stop position of a trip instance from one TripUpdate [C, GTFS-Realtime
 * reference, trip updates]:
 * - a stop named by a StopTimeUpdate takes its time, or the scheduled time plus its delay;
 * - a stop without an update takes the delay of the previous update (propagation), downstream only;
 *   stops before the first update are unknown;
 * - NO_DATA: this stop is unknown and propagation stops until the next update;
 * - SKIPPED: the stop is not served; the previous delay keeps propagating past it.
 * Within one update, a missing departure takes the arrival's delay and a missing arrival the
 * departure's (our reading of the spec's "same delay" rule within a stop, [M]).
 * Updates are matched by stop_sequence, else by stop_id searching forward from the previous match.
 */
export function resolveStopTimeUpdates(updates: IStopTimeUpdate[], sched: TripSchedule, originS: number): StopEvents {
  const n = sched.seq.length;
  const arrS = new Float64Array(n).fill(NaN);
  const depS = new Float64Array(n).fill(NaN);
  const source = new Uint8Array(n);
  const byPos: (IStopTimeUpdate | undefined)[] = new Array(n);
  let unplaced = 0;
  let cursor = 0;
  for (const u of updates) {
    let pos = -1;
    if (hasField(u, 'stopSequence')) {
      for (let i = 0; i < n; i++) {
        if (sched.seq[i] === u.stopSequence) {
          pos = i;
          break;
        }
      }
    } else if (u.stopId) {
      for (let i = cursor; i < n; i++) {
        if (sched.stopIds[i] === u.stopId) {
          pos = i;
          break;
        }
      }
    }
    if (pos < 0) {
      unplaced++;
      continue;
    }
    byPos[pos] = u;
    cursor = pos + 1;
  }
  let delay: number | null = null; // delay being propagated, null = none
  for (let i = 0; i < n; i++) {
    const u = byPos[i];
    if (u) {
      const rel = u.scheduleRelationship ?? StuRel.SCHEDULED;
      if (rel === StuRel.NO_DATA) {
        delay = null;
        continue;
      }
      if (rel === StuRel.SKIPPED) {
        source[i] = EVENT_SKIPPED;
        continue;
      }
      const a = eventTime(u.arrival, sched.schedArrS[i], originS);
      const d = eventTime(u.departure, sched.schedDepS[i], originS);
      if (!a && !d) {
        // an update with neither event: nothing new here, keep the previous delay going
        if (delay !== null) propagate(i, delay);
        continue;
      }
      const arrDelay = a ? a.delay : d!.delay;
      const depDelay = d ? d.delay : a!.delay;
      arrS[i] = a ? a.t : sched.schedArrS[i] >= 0 ? originS + sched.schedArrS[i] + arrDelay : NaN;
      depS[i] = d ? d.t : sched.schedDepS[i] >= 0 ? originS + sched.schedDepS[i] + depDelay : NaN;
      source[i] = EVENT_EXPLICIT;
      delay = Number.isFinite(depDelay) ? depDelay : Number.isFinite(arrDelay) ? arrDelay : null;
    } else if (delay !== null) {
      propagate(i, delay);
    }
  }
  return { arrS, depS, source, unplaced };

  function propagate(i: number, dl: number): void {
    if (sched.schedArrS[i] >= 0) arrS[i] = originS + sched.schedArrS[i] + dl;
    if (sched.schedDepS[i] >= 0) depS[i] = originS + sched.schedDepS[i] + dl;
    source[i] = EVENT_PROPAGATED;
  }
}
