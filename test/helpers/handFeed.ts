// Test helper: builds small Feed objects by hand, set in the invented city of Vellmoor, so the network
// stage can be tested without the reader. Coordinates are given in metres east and north of a centre.

import type { Feed, Stop, CalendarRow, CalendarDate, Frequency } from '../../src/gtfs/types.js';
import { assembleFeed, type TripRows } from './feedObject.js';
import { EARTH_RADIUS_M } from '../../src/network/geodesy.js';

export const CENTRE = { lat: 52.0, lon: 4.9 };
const LAT_M = (EARTH_RADIUS_M * Math.PI) / 180;
const LON_M = LAT_M * Math.cos((CENTRE.lat * Math.PI) / 180);

/** [lat, lon] of a point x metres east and y metres north of the Vellmoor centre (equirectangular). */
export function at(x: number, y: number): { lat: number; lon: number } {
  return { lat: CENTRE.lat + y / LAT_M, lon: CENTRE.lon + x / LON_M };
}

export interface StopTimeSpec {
  stop: string;
  arr?: number | null; // seconds; null = blank
  dep?: number | null; // defaults to arr
  dist?: number; // shape_dist_traveled
  noService?: boolean;
}
export interface TripSpec {
  id: string;
  route?: string;
  dir?: number;
  service?: string;
  shape?: string;
  headsign?: string;
  times: StopTimeSpec[];
}
export interface FeedSpec {
  stops: Record<string, [number, number]>; // id -> [x east m, y north m]
  trips: TripSpec[];
  routes?: string[];
  shapes?: Record<string, { xy: [number, number][]; dist?: number[] }>;
  calendar?: CalendarRow[];
  calendarDates?: CalendarDate[];
  frequencies?: Frequency[];
  date?: string | null;
}

export function handFeed(spec: FeedSpec): Feed {
  const stops: Stop[] = Object.entries(spec.stops).map(([id, [x, y]]) => ({
    id,
    code: '',
    name: `Vellmoor ${id}`,
    ...at(x, y),
    locationType: 0,
    parentStation: '',
  }));
  const stopIndex = new Map(stops.map((s, i) => [s.id, i]));
  const routeIds = spec.routes ?? [...new Set(spec.trips.map((t) => t.route ?? 'V1'))];
  const trips: TripRows[] = spec.trips.map((t) => {
    const arr = t.times.map((s) => (s.arr === null || s.arr === undefined ? -1 : s.arr));
    return {
      trip: {
        id: t.id,
        routeId: t.route ?? 'V1',
        serviceId: t.service ?? 'WK',
        directionId: t.dir ?? 0,
        headsign: t.headsign ?? 'Vellmoor Harbour',
        shapeId: t.shape ?? '',
      },
      stopIdx: t.times.map((s) => {
        const i = stopIndex.get(s.stop);
        if (i === undefined) throw new Error(`handFeed: unknown stop ${s.stop}`);
        return i;
      }),
      seq: t.times.map((_, i) => (i + 1) * 10),
      arrS: arr,
      depS: t.times.map((s, i) => (s.dep === undefined ? arr[i] : s.dep === null ? -1 : s.dep)),
      shapeDist: t.times.map((s) => s.dist ?? NaN),
      timepoint: arr.map((a) => (a >= 0 ? 1 : 0)),
      noService: t.times.map((s) => (s.noService ? 1 : 0)),
    };
  });
  return assembleFeed({
    source: 'vellmoor-hand-built',
    date: spec.date === undefined ? '2026-10-14' : spec.date,
    contentHash: 'test',
    stops,
    routes: routeIds.map((id) => ({ id, agencyId: 'VT', shortName: id, longName: '', type: 3 })),
    trips,
    shapes: Object.entries(spec.shapes ?? {}).map(([id, sh]) => {
      const pts = sh.xy.map(([x, y]) => at(x, y));
      return { id, lat: pts.map((q) => q.lat), lon: pts.map((q) => q.lon), dist: sh.dist };
    }),
    calendar: spec.calendar,
    calendarDates: spec.calendarDates,
    frequencies: spec.frequencies,
    feedInfo: null,
  });
}

/** A polyline from (x0,y0) to (x1,y1) with points every stepM metres (both ends included). */
export function line(x0: number, y0: number, x1: number, y1: number, stepM = 10): [number, number][] {
  const len = Math.hypot(x1 - x0, y1 - y0);
  const n = Math.max(1, Math.round(len / stepM));
  return Array.from({ length: n + 1 }, (_, i) => [x0 + ((x1 - x0) * i) / n, y0 + ((y1 - y0) * i) / n] as [number, number]);
}
