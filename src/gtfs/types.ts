// Typed, compact records of a GTFS Schedule feed. Big tables (stop_times, shapes) are held as typed
// arrays per trip or shape, never as one object per row.

import type { FeedWarning } from '../common/warnings.js';

export interface Agency {
  id: string;
  name: string;
  timezone: string;
}

export interface Route {
  id: string;
  agencyId: string;
  shortName: string;
  longName: string;
  type: number; // GTFS route_type (0 tram, 1 subway, 2 rail, 3 bus, ... and extended 100-1700)
}

export interface Stop {
  id: string;
  code: string;
  name: string;
  lat: number;
  lon: number;
  locationType: number; // 0 or empty = stop/platform, 1 station, 2 entrance, 3 generic node, 4 boarding area
  parentStation: string;
}

export interface Trip {
  id: string;
  routeId: string;
  serviceId: string;
  directionId: number; // 0 or 1; -1 when the feed leaves direction_id blank
  headsign: string;
  shapeId: string; // '' when none
}

/** One trip's stop_times, sorted by stop_sequence. Times in seconds after midnight of the service day. */
export interface TripStopTimes {
  stopIdx: Int32Array; // index into Feed.stops
  seq: Int32Array; // stop_sequence as given
  arrS: Int32Array; // arrival_time in seconds; -1 where blank
  depS: Int32Array; // departure_time in seconds; -1 where blank
  shapeDist: Float64Array; // shape_dist_traveled in the feed's unit; NaN where blank
  timepoint: Uint8Array; // 1 exact (timepoint=1, or times given and the column absent), 0 approximate
  noService: Uint8Array; // 1 when pickup_type=1 and drop_off_type=1: not a passenger stop
}

export interface Shape {
  id: string;
  lat: Float64Array; // sorted by shape_pt_sequence
  lon: Float64Array;
  dist: Float64Array; // shape_dist_traveled in the feed's unit; NaN where blank
}

export interface Frequency {
  tripId: string;
  startS: number;
  endS: number;
  headwayS: number;
  exactTimes: 0 | 1; // 1: trips start exactly at start + k*headway; 0: nominal headway
}

export interface CalendarRow {
  serviceId: string;
  days: [boolean, boolean, boolean, boolean, boolean, boolean, boolean]; // monday..sunday
  start: string; // YYYYMMDD
  end: string; // YYYYMMDD, inclusive
}

export interface CalendarDate {
  serviceId: string;
  date: string; // YYYYMMDD
  exceptionType: 1 | 2; // 1 adds service, 2 removes it
}

export interface FeedInfo {
  publisherName: string;
  version: string;
  startDate: string;
  endDate: string;
}

export interface Feed {
  source: string; // the path or URL as given
  /** Analysis date (YYYY-MM-DD) whose trips were kept, or null when every trip was kept. */
  date: string | null;
  contentHash: string; // sha256 of the archive bytes (or of the folder's table files), hex
  agencies: Agency[];
  routes: Map<string, Route>;
  stops: Stop[];
  stopIndex: Map<string, number>; // stop_id -> index into stops
  trips: Map<string, Trip>;
  /**
   * stop_times per kept trip (read-only). The reader gives a StopTimesStore, which holds each distinct run
   * of rows once (see stopTimesStore.ts); any Map of TripStopTimes does as well.
   */
  stopTimes: ReadonlyMap<string, TripStopTimes>;
  /**
   * Set when stopTimes holds only the trips running on this date (YYYY-MM-DD), as readFeed's holdDay
   * asks; patterns can then be built for this date only. Absent: every trip in trips is held.
   */
  held?: string;
  shapes: Map<string, Shape>;
  calendar: CalendarRow[];
  calendarDates: CalendarDate[];
  frequencies: Frequency[];
  feedInfo: FeedInfo | null;
  warnings: FeedWarning[];
  /** Row counts per table read, for the summary and the benchmark. */
  rowCounts: Record<string, number>;
}
