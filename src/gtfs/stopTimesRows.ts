// Reads one stop_times.txt record into typed values: the kept trip, the stop, stop_sequence, times,
// shape_dist_traveled, timepoint and the no-service flag. Shared by the reader on the main thread and the
// worker threads that parse blocks of a big table (stopTimesWorker.ts), so both check every field alike.

import { StopspanError } from '../common/errors.js';
import type { CsvRow } from './csv.js';
import { badField, BLANK, fieldNumber, fieldTimeS, fieldUint, intField, MALFORMED } from './values.js';

export const STOP_TIMES_FILE = 'stop_times.txt';
export const STOP_TIMES_REQUIRED = ['trip_id', 'stop_id', 'stop_sequence'] as const;
export const STOP_TIMES_OPTIONAL = ['arrival_time', 'departure_time', 'shape_dist_traveled', 'timepoint', 'pickup_type', 'drop_off_type'] as const;
export type StopTimesColumns = Record<(typeof STOP_TIMES_REQUIRED)[number] | (typeof STOP_TIMES_OPTIONAL)[number], number>;

/** What a record is checked against: the kept trips, the stops, and which stops are stations. */
export interface StopTimesLookup {
  tripIdx: Map<string, number>;
  stopIndex: Map<string, number>;
  station: Uint8Array; // per stop index, 1 for location_type 1
}

/** Where a read record goes. */
export interface StopTimesSink {
  push(t: number, stop: number, seq: number, arr: number, dep: number, dist: number, tp: number, ns: number): void;
}

/** A record reader for stop_times.txt; `atStation` counts rows naming a station instead of a stop. */
export class StopTimesRowReader {
  atStation = 0;
  // a trip's rows mostly come together: the trip of the row before is checked first, without a new string
  private lastTripId = '\0';
  private lastTrip: number | undefined;

  constructor(
    private readonly lookup: StopTimesLookup,
    private readonly c: StopTimesColumns,
    private readonly sink: StopTimesSink,
  ) {}

  read(row: CsvRow): void {
    const c = this.c;
    const F = STOP_TIMES_FILE;
    if (!row.equals(c.trip_id, this.lastTripId)) {
      this.lastTripId = row.get(c.trip_id);
      this.lastTrip = this.lookup.tripIdx.get(this.lastTripId);
    }
    const t = this.lastTrip;
    if (t === undefined) return;
    const stopId = row.get(c.stop_id);
    const s = this.lookup.stopIndex.get(stopId);
    if (s === undefined) throw new StopspanError('bad-reference', 'stop_id is not in stops.txt', { file: F, line: row.line, column: 'stop_id', value: stopId });
    const seq = fieldUint(row, c.stop_sequence);
    if (seq < 0) badField(F, row, c.stop_sequence, 'stop_sequence', 'a non-negative integer');
    let arr = c.arrival_time < 0 ? BLANK : fieldTimeS(row, c.arrival_time);
    if (arr === MALFORMED) badField(F, row, c.arrival_time, 'arrival_time', 'a time H:MM:SS');
    let dep = c.departure_time < 0 ? BLANK : fieldTimeS(row, c.departure_time);
    if (dep === MALFORMED) badField(F, row, c.departure_time, 'departure_time', 'a time H:MM:SS');
    // [GTFS Schedule reference: when only one of arrival_time and departure_time is given, they are the same]
    if (arr < 0 && dep >= 0) arr = dep;
    else if (dep < 0 && arr >= 0) dep = arr;
    let dist = NaN;
    if (c.shape_dist_traveled >= 0 && !row.isBlank(c.shape_dist_traveled)) {
      const d = fieldNumber(row, c.shape_dist_traveled);
      if (d === null || d < 0) badField(F, row, c.shape_dist_traveled, 'shape_dist_traveled', 'a non-negative number');
      dist = d;
    }
    const tp = intField(F, row, c.timepoint, 'timepoint', 0, 1, -1);
    const pickup = intField(F, row, c.pickup_type, 'pickup_type', 0, 3, 0);
    const dropOff = intField(F, row, c.drop_off_type, 'drop_off_type', 0, 3, 0);
    // [GTFS Schedule reference: timepoint empty means exact times when times are given]
    const exact = tp === 1 || (tp === -1 && arr >= 0);
    if (this.lookup.station[s] === 1) this.atStation++;
    this.sink.push(t, s, seq, arr, dep, dist, exact ? 1 : 0, pickup === 1 && dropOff === 1 ? 1 : 0);
  }
}

/** Growable typed columns of read records, in table order: what a worker hands back for its block. */
export class StopTimesBuffer implements StopTimesSink {
  n = 0;
  trip = new Int32Array(1 << 14);
  stop = new Int32Array(1 << 14);
  seq = new Int32Array(1 << 14);
  arr = new Int32Array(1 << 14);
  dep = new Int32Array(1 << 14);
  dist = new Float64Array(1 << 14);
  tp = new Uint8Array(1 << 14);
  ns = new Uint8Array(1 << 14);

  push(t: number, stop: number, seq: number, arr: number, dep: number, dist: number, tp: number, ns: number): void {
    if (this.n === this.trip.length) this.grow();
    const w = this.n++;
    this.trip[w] = t;
    this.stop[w] = stop;
    this.seq[w] = seq;
    this.arr[w] = arr;
    this.dep[w] = dep;
    this.dist[w] = dist;
    this.tp[w] = tp;
    this.ns[w] = ns;
  }

  /** Replays the records into another sink, in order. */
  replay(into: StopTimesSink): void {
    for (let r = 0; r < this.n; r++) into.push(this.trip[r], this.stop[r], this.seq[r], this.arr[r], this.dep[r], this.dist[r], this.tp[r], this.ns[r]);
  }

  private grow(): void {
    const m = this.trip.length * 2;
    const g = <T extends Int32Array | Float64Array | Uint8Array>(a: T, make: (n: number) => T): T => {
      const b = make(m);
      b.set(a);
      return b;
    };
    this.trip = g(this.trip, (k) => new Int32Array(k));
    this.stop = g(this.stop, (k) => new Int32Array(k));
    this.seq = g(this.seq, (k) => new Int32Array(k));
    this.arr = g(this.arr, (k) => new Int32Array(k));
    this.dep = g(this.dep, (k) => new Int32Array(k));
    this.dist = g(this.dist, (k) => new Float64Array(k));
    this.tp = g(this.tp, (k) => new Uint8Array(k));
    this.ns = g(this.ns, (k) => new Uint8Array(k));
  }
}
