// Reads one stop_times.txt record into typed values: the kept trip, the stop, stop_sequence, times,
// shape_dist_traveled, timepoint and the no-service flag, checking every field. The hottest code of the
// reader (a big city has millions of these rows), so it makes no string it does not need.

import { StopspanError } from '../common/errors.js';
import type { CsvRow } from './csvCore.js';
import { badField, BLANK, fieldNumber, fieldTimeS, fieldUint, intField, MALFORMED, TIME_EXPECTED } from './values.js';

export const STOP_TIMES_FILE = 'stop_times.txt';
export const STOP_TIMES_REQUIRED = ['trip_id', 'stop_id', 'stop_sequence'] as const;
export const STOP_TIMES_OPTIONAL = [
  'arrival_time',
  'departure_time',
  'shape_dist_traveled',
  'timepoint',
  'pickup_type',
  'drop_off_type',
] as const;
/**
 * Most stop_times rows one trip may have: 10 000. The longest real trips serve a few hundred stops (a
 * long bus route about 150, a long-distance train under 100); beyond this the feed is refused as too large
 * before its rows fill memory, and every later stage (patterns, spacing) stays bounded per trip.
 */
export const MAX_STOPS_PER_TRIP = 10_000;

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

/**
 * A record reader for stop_times.txt; `atStation` counts rows naming a station instead of a stop. The CSV
 * reader hands rows over grouped by trip_id: startTrip() is asked once per run of one trip's rows and
 * says whether the trip is kept; read() then takes each row of a kept run. A row repeating the
 * stop_sequence of the row just before it is dropped here and counted in `repeated` (the first row of a
 * repeated value is the one kept, as when a trip's rows are sorted), so a flood of one row costs nothing;
 * a run of more than MAX_STOPS_PER_TRIP rows is refused as too large.
 */
export class StopTimesRowReader {
  atStation = 0;
  /** Rows dropped for repeating the stop_sequence of the row before them. */
  repeated = 0;
  private trip = -1;
  private tripId = '';
  private runRows = 0;
  private lastSeq = -1;

  constructor(
    private readonly lookup: StopTimesLookup,
    private readonly sink: StopTimesSink,
  ) {}

  startTrip(tripId: string): boolean {
    this.trip = this.lookup.tripIdx.get(tripId) ?? -1;
    this.tripId = tripId;
    this.runRows = 0;
    this.lastSeq = -1;
    return this.trip >= 0;
  }

  read(row: CsvRow, c: StopTimesColumns): void {
    const F = STOP_TIMES_FILE;
    const t = this.trip;
    const stopId = row.get(c.stop_id);
    const s = this.lookup.stopIndex.get(stopId);
    if (s === undefined)
      throw new StopspanError('bad-reference', 'stop_id is not in stops.txt', {
        file: F,
        line: row.line,
        column: 'stop_id',
        value: stopId,
      });
    const seq = fieldUint(row, c.stop_sequence);
    if (seq < 0) badField(F, row, c.stop_sequence, 'stop_sequence', 'a non-negative integer');
    let arr = c.arrival_time < 0 ? BLANK : fieldTimeS(row, c.arrival_time);
    if (arr === MALFORMED) badField(F, row, c.arrival_time, 'arrival_time', TIME_EXPECTED);
    let dep = c.departure_time < 0 ? BLANK : fieldTimeS(row, c.departure_time);
    if (dep === MALFORMED) badField(F, row, c.departure_time, 'departure_time', TIME_EXPECTED);
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
    if (seq === this.lastSeq) {
      this.repeated++;
      return;
    }
    this.lastSeq = seq;
    if (++this.runRows > MAX_STOPS_PER_TRIP) {
      throw new StopspanError('feed-too-large', `a trip has more than ${MAX_STOPS_PER_TRIP} stop_times rows, the cap per trip`, {
        file: F,
        line: row.line,
        column: 'trip_id',
        value: this.tripId,
      });
    }
    if (this.lookup.station[s] === 1) this.atStation++;
    this.sink.push(t, s, seq, arr, dep, dist, exact ? 1 : 0, pickup === 1 && dropOff === 1 ? 1 : 0);
  }
}
