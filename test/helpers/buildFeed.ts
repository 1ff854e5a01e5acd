// Test helper: builds a Feed and a PatternSet by hand, so the checks can be tested without the reader.
// Patterns here are one per trip, with straight-line distances unless a shape offset is given.

import type { Feed, Stop, Route, CalendarRow, CalendarDate } from '../../src/gtfs/types.js';
import { assembleFeed, handPattern, routesAtStopOf, type TripRows } from './feedObject.js';
import type { Pattern, PatternSet } from '../../src/network/types.js';
import type { FeedWarning } from '../../src/common/warnings.js';
import { haversineM } from '../../src/network/geodesy.js';

export interface StopSpec {
  id: string;
  lat: number;
  lon: number;
  name?: string;
  parentStation?: string;
  locationType?: number;
}
export interface TripSpec {
  id: string;
  routeId?: string;
  serviceId?: string;
  shapeId?: string;
  directionId?: number;
  /** [stop_id, arrival s, departure s, shape_dist_traveled?] */
  times: [string, number, number, number?][];
  timepoint?: boolean; // default true
}
export interface FeedSpec {
  stops: StopSpec[];
  trips: TripSpec[];
  routes?: Partial<Route>[];
  shapes?: { id: string; pts: [number, number][]; dist?: number[] }[];
  calendar?: CalendarRow[];
  calendarDates?: CalendarDate[];
  warnings?: FeedWarning[];
  offsets?: Record<string, number>; // stop_id -> offset from shape, metres
  version?: string;
}

/** A straight east-west street in Vellmoor: stop k at 400 m * k east of the origin. */
export function street(n: number, spacingM = 400, prefix = 'S'): StopSpec[] {
  const lat = 52.37;
  const mPerDegLon = haversineM(lat, 0, lat, 1);
  return Array.from({ length: n }, (_, k) => ({
    id: `${prefix}${k + 1}`,
    lat,
    lon: 4.9 + (k * spacingM) / mPerDegLon,
    name: `Vellmoor ${prefix}${k + 1}`,
  }));
}

export function buildFeed(spec: FeedSpec): { feed: Feed; patterns: PatternSet } {
  const stops: Stop[] = spec.stops.map((s) => ({
    id: s.id,
    code: '',
    name: s.name ?? s.id,
    lat: s.lat,
    lon: s.lon,
    locationType: s.locationType ?? 0,
    parentStation: s.parentStation ?? '',
  }));
  const stopIndex = new Map(stops.map((s, i) => [s.id, i]));
  const trips: TripRows[] = spec.trips.map((t) => ({
    trip: {
      id: t.id,
      routeId: t.routeId ?? 'R1',
      serviceId: t.serviceId ?? 'WK',
      directionId: t.directionId ?? 0,
      headsign: 'Vellmoor Centraal',
      shapeId: t.shapeId ?? '',
    },
    stopIdx: t.times.map((x) => stopIndex.get(x[0]) ?? -1),
    seq: t.times.map((_, i) => i + 1),
    arrS: t.times.map((x) => x[1]),
    depS: t.times.map((x) => x[2]),
    shapeDist: t.times.map((x) => (x[3] === undefined ? NaN : x[3])),
    timepoint: t.times.map(() => (t.timepoint === false ? 0 : 1)),
    noService: t.times.map(() => 0),
  }));
  const feed = assembleFeed({
    source: 'vellmoor-test',
    date: null,
    contentHash: 'h' + spec.stops.length,
    stops,
    routes: (spec.routes ?? [{ id: 'R1' }]).map((r) => ({
      id: r.id!,
      agencyId: r.agencyId ?? '',
      shortName: r.shortName ?? r.id!,
      longName: r.longName ?? '',
      type: r.type ?? 3,
    })),
    trips,
    shapes: (spec.shapes ?? []).map((sh) => ({ id: sh.id, lat: sh.pts.map((q) => q[0]), lon: sh.pts.map((q) => q[1]), dist: sh.dist })),
    calendar: spec.calendar,
    calendarDates: spec.calendarDates,
    feedInfo: { publisherName: 'Vellmoor Transit', version: spec.version ?? 'v1', startDate: '', endDate: '' },
    warnings: spec.warnings,
  });
  const patterns: Pattern[] = spec.trips.map((t, k) => {
    const idx = t.times.map((x) => stopIndex.get(x[0]) ?? -1);
    const dist = [0];
    for (let i = 1; i < idx.length; i++) {
      const a = stops[idx[i - 1]];
      const b = stops[idx[i]];
      dist.push(dist[i - 1] + haversineM(a.lat, a.lon, b.lat, b.lon));
    }
    const gapRunTimeS = t.times.slice(1).map((x, i) => x[1] - t.times[i][2]);
    return handPattern({
      id: `${t.routeId ?? 'R1'}:${t.directionId ?? 0}:${k + 1}`,
      routeId: t.routeId ?? 'R1',
      directionId: t.directionId ?? 0,
      headsign: 'Vellmoor Centraal',
      shapeId: t.shapeId ?? '',
      tripIds: [t.id],
      stopIdx: idx,
      distAlongM: dist,
      offsetFromShapeM: t.times.map((x) => (t.shapeId ? (spec.offsets?.[x[0]] ?? 0) : null)),
      distanceSource: t.shapeId ? 'shape_projection' : 'great_circle',
      timepoint: idx.map(() => t.timepoint !== false),
      gapRunTimeS,
      runTimeS: t.times[t.times.length - 1][1] - t.times[0][2],
      scheduledDwellS: t.times.map((x) => x[2] - x[1]),
    });
  });
  const routesAtStop = routesAtStopOf(patterns);
  return { feed, patterns: { date: '2026-10-14', patterns, routesAtStop } };
}

/** A clean one-route feed on the Vellmoor street: 5 stops 400 m apart, 60 s per gap (24 km/h), a shape. */
export function cleanSpec(): FeedSpec {
  const stops = street(5);
  const times: [string, number, number, number?][] = stops.map((s, k) => [s.id, 28800 + 60 * k, 28800 + 60 * k, 400 * k]);
  return {
    stops,
    trips: [{ id: 'T1', shapeId: 'SH1', times }],
    shapes: [{ id: 'SH1', pts: stops.map((s) => [s.lat, s.lon] as [number, number]), dist: stops.map((_, k) => 400 * k) }],
  };
}
