// Test helper: assembles a Feed object (as readFeed returns it) and a Pattern (as buildPatterns makes it)
// from plain lists, for the builders that set small networks in Vellmoor by hand (buildFeed.ts,
// handFeed.ts, handmade.ts and realtimeNetwork.ts beside this file). Each builder keeps its own way of
// describing stops and trips; what a Feed and a Pattern are made of is written here once.

import type {
  CalendarDate,
  CalendarRow,
  Feed,
  FeedInfo,
  Frequency,
  Route,
  Shape,
  Stop,
  Trip,
  TripStopTimes,
} from '../../src/gtfs/types.js';
import type { FeedWarning } from '../../src/common/warnings.js';
import type { Agency } from '../../src/gtfs/types.js';
import type { Pattern } from '../../src/network/types.js';

/** One trip's rows, a value per row (times in seconds, -1 blank; shape distances NaN when none). */
export interface TripRows {
  trip: Trip;
  stopIdx: number[];
  seq: number[];
  arrS: number[];
  depS: number[];
  shapeDist: number[];
  timepoint: number[];
  noService: number[];
}

export interface FeedParts {
  source: string;
  date: string | null;
  contentHash: string;
  stops: Stop[];
  routes: Route[];
  trips: TripRows[];
  shapes: { id: string; lat: number[]; lon: number[]; dist?: number[] }[];
  calendar?: CalendarRow[];
  calendarDates?: CalendarDate[];
  frequencies?: Frequency[];
  feedInfo: FeedInfo | null;
  warnings?: FeedWarning[];
  agencies?: Agency[]; // default: one agency, Vellmoor Transit (VT), Europe/Amsterdam
}

/** Weekdays of 2026 and 2027, service WK: what the hand-built feeds run on unless told otherwise. */
export const WEEKDAYS: CalendarRow = {
  serviceId: 'WK',
  days: [true, true, true, true, true, false, false],
  start: '20260101',
  end: '20271231',
};

export function assembleFeed(p: FeedParts): Feed {
  const trips = new Map<string, Trip>();
  const stopTimes = new Map<string, TripStopTimes>();
  for (const t of p.trips) {
    trips.set(t.trip.id, t.trip);
    stopTimes.set(t.trip.id, {
      stopIdx: Int32Array.from(t.stopIdx),
      seq: Int32Array.from(t.seq),
      arrS: Int32Array.from(t.arrS),
      depS: Int32Array.from(t.depS),
      shapeDist: Float64Array.from(t.shapeDist),
      timepoint: Uint8Array.from(t.timepoint),
      noService: Uint8Array.from(t.noService),
    });
  }
  const shapes = new Map<string, Shape>();
  for (const s of p.shapes) {
    shapes.set(s.id, {
      id: s.id,
      lat: Float64Array.from(s.lat),
      lon: Float64Array.from(s.lon),
      dist: Float64Array.from(s.dist ?? s.lat.map(() => NaN)),
    });
  }
  return {
    source: p.source,
    date: p.date,
    contentHash: p.contentHash,
    agencies: p.agencies ?? [{ id: 'VT', name: 'Vellmoor Transit', timezone: 'Europe/Amsterdam' }],
    routes: new Map(p.routes.map((r) => [r.id, r])),
    stops: p.stops,
    stopIndex: new Map(p.stops.map((s, i) => [s.id, i])),
    trips,
    stopTimes,
    shapes,
    calendar: p.calendar ?? [WEEKDAYS],
    calendarDates: p.calendarDates ?? [],
    frequencies: p.frequencies ?? [],
    feedInfo: p.feedInfo,
    warnings: p.warnings ?? [],
    rowCounts: {},
  };
}

/** What a hand-made pattern must say; everything else has the default handPattern gives. */
export type PatternParts = Pick<Pattern, 'id' | 'routeId' | 'stopIdx' | 'distAlongM' | 'gapRunTimeS'> & Partial<Pattern>;

/**
 * A Pattern from its stops, distances along and run time per gap: direction 0, no shape (great-circle
 * distances, the stops as its path unless given), every stop a passenger stop, no timepoint, no dwell,
 * one run's time the sum of its gaps and dwells, and as many trips per day as tripIds lists.
 */
export function handPattern(p: PatternParts): Pattern {
  const n = p.stopIdx.length;
  const scheduledDwellS = p.scheduledDwellS ?? p.stopIdx.map(() => 0);
  const tripIds = p.tripIds ?? [];
  return {
    directionId: 0,
    headsign: '',
    shapeId: '',
    tripIds,
    tripsPerDay: p.tripsPerDay ?? tripIds.length,
    nominalFrequencyTrips: 0,
    offsetFromShapeM: p.stopIdx.map(() => null),
    distanceSource: 'great_circle',
    lengthM: p.distAlongM[n - 1],
    passengerStop: p.stopIdx.map(() => true),
    timepoint: p.stopIdx.map(() => false),
    gapTimeInterpolated: p.gapRunTimeS.map(() => false),
    runTimeS: p.runTimeS ?? p.gapRunTimeS.reduce((a, b) => a + b, 0) + scheduledDwellS.reduce((a, b) => a + b, 0),
    path: [],
    ...p,
    scheduledDwellS,
  };
}

/** The routes serving each stop, as buildPatterns gives them in PatternSet.routesAtStop. */
export function routesAtStopOf(patterns: Pattern[]): Map<number, Set<string>> {
  const routesAtStop = new Map<number, Set<string>>();
  for (const p of patterns) for (const s of p.stopIdx) (routesAtStop.get(s) ?? routesAtStop.set(s, new Set()).get(s)!).add(p.routeId);
  return routesAtStop;
}
