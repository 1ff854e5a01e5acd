// The GTFS-Realtime delay-propagation rules, on the spec's own example, through a message encoded and
// decoded by the published bindings.

import { describe, expect, it } from 'vitest';
import GtfsRealtimeBindings from 'gtfs-realtime-bindings';
import { resolveStopTimeUpdates, EVENT_EXPLICIT, EVENT_PROPAGATED, EVENT_SKIPPED, EVENT_UNKNOWN } from '../../src/realtime/index.js';

const rt = GtfsRealtimeBindings.transit_realtime;
const STU = rt.TripUpdate.StopTimeUpdate.ScheduleRelationship;

// 20 stops, stop_sequence 1..20, scheduled every 120 s from 08:00:00, no dwell
function schedule(n = 20) {
  const seq = Int32Array.from({ length: n }, (_, i) => i + 1);
  const t = Int32Array.from({ length: n }, (_, i) => 8 * 3600 + i * 120);
  return { seq, stopIds: Array.from({ length: n }, (_, i) => `S${i + 1}`), schedArrS: t, schedDepS: t };
}

function roundTrip(updates: GtfsRealtimeBindings.transit_realtime.TripUpdate.IStopTimeUpdate[]) {
  const msg = rt.FeedMessage.fromObject({
    header: { gtfsRealtimeVersion: '2.0', incrementality: rt.FeedHeader.Incrementality.FULL_DATASET, timestamp: 1_800_000_000 },
    entity: [{ id: 'e1', tripUpdate: { trip: { tripId: 'T1', startDate: '20261104' }, stopTimeUpdate: updates } }],
  });
  const bytes = rt.FeedMessage.encode(msg).finish();
  const decoded = rt.FeedMessage.decode(bytes).entity[0].tripUpdate?.stopTimeUpdate;
  if (!decoded) throw new Error('the round trip lost the stop_time_updates');
  return decoded;
}

describe('resolveStopTimeUpdates', () => {
  const originS = 1_800_000_000 - 8 * 3600;

  it("reads the spec's example: 300 s at stop_sequence 3, 60 s at 8, NO_DATA at 10", () => {
    // [C, GTFS-Realtime reference, trip updates, delay propagation example]: stops 1-2 unknown,
    // 3-7 delayed 300 s, 8-9 delayed 60 s, 10-20 unknown.
    const updates = roundTrip([
      { stopSequence: 3, arrival: { delay: 300 } },
      { stopSequence: 8, arrival: { delay: 60 } },
      { stopSequence: 10, scheduleRelationship: STU.NO_DATA },
    ]);
    const sched = schedule();
    const ev = resolveStopTimeUpdates(updates, sched, originS);
    const delays = Array.from(ev.arrS, (a, i) => (Number.isNaN(a) ? null : a - (originS + sched.schedArrS[i])));
    expect(delays).toEqual([null, null, 300, 300, 300, 300, 300, 60, 60, ...new Array(11).fill(null)]);
    expect(ev.source[2]).toBe(EVENT_EXPLICIT);
    expect(ev.source[3]).toBe(EVENT_PROPAGATED);
    expect(ev.source[7]).toBe(EVENT_EXPLICIT);
    expect(ev.source[9]).toBe(EVENT_UNKNOWN);
    expect(ev.source[19]).toBe(EVENT_UNKNOWN);
    // a departure without its own event carries the arrival's delay
    expect(ev.depS[2] - (originS + sched.schedDepS[2])).toBe(300);
  });

  it('takes absolute times as given and derives the delay that propagates from them', () => {
    const sched = schedule();
    const t5 = originS + sched.schedArrS[4] + 45;
    const ev = resolveStopTimeUpdates(
      roundTrip([{ stopSequence: 5, arrival: { time: t5 }, departure: { time: t5 + 10 } }]),
      sched,
      originS,
    );
    expect(ev.arrS[4]).toBe(t5);
    expect(ev.depS[4]).toBe(t5 + 10);
    expect(ev.arrS[5] - (originS + sched.schedArrS[5])).toBe(55); // departure delay 55 s propagates
  });

  it('lets the delay propagate past a SKIPPED stop and matches updates by stop_id when stop_sequence is absent', () => {
    const sched = schedule();
    const ev = resolveStopTimeUpdates(
      roundTrip([
        { stopId: 'S4', arrival: { delay: 120 } },
        { stopId: 'S6', scheduleRelationship: STU.SKIPPED },
      ]),
      sched,
      originS,
    );
    expect(ev.source[5]).toBe(EVENT_SKIPPED);
    expect(Number.isNaN(ev.arrS[5])).toBe(true);
    expect(ev.arrS[6] - (originS + sched.schedArrS[6])).toBe(120);
  });

  it('counts updates that name no stop of the trip', () => {
    const ev = resolveStopTimeUpdates(
      roundTrip([
        { stopSequence: 99, arrival: { delay: 1 } },
        { stopId: 'NOPE', arrival: { delay: 1 } },
      ]),
      schedule(),
      originS,
    );
    expect(ev.unplaced).toBe(2);
    expect(Array.from(ev.source).every((s) => s === EVENT_UNKNOWN)).toBe(true);
  });
});
