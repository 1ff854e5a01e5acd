// Reads a GTFS Schedule feed into the compact Feed of types.ts. The small tables come first so the
// analysis date (and with it the trips to keep) is known before the big ones stream: stop_times.txt is
// collected into blocks of typed columns for the kept trips only, each trip's rows together and sorted by
// stop_sequence, and the Feed's per-trip arrays are views into those blocks; shapes.txt keeps only the
// shapes those trips use. Bad input throws StopspanError with file, line, column and value; recoverable
// oddities are counted in the WarningSink and Feed.warnings.

import { StopspanError } from '../common/errors.js';
import type { OnProgress } from '../common/progress.js';
import { WarningSink } from '../common/warnings.js';
import { ownCopy } from '../common/ownCopy.js';
import type { Readable } from 'node:stream';
import { openFeed, type ArchiveLimits, type FeedArchive } from './archive.js';
import { defaultAnalysisDate, isoToGtfsDate, servicesOn } from './calendar.js';
import { readCsv, type CsvGroupKey } from './csv.js';
import type { CsvRow } from './csvCore.js';
import type { DownloadLimits, FetchOptions } from './download.js';
import { shownUrl } from './requestHeaders.js';
import { runsPerService } from './frequencies.js';
import type { Agency, CalendarDate, CalendarRow, Feed, FeedInfo, Frequency, Route, Shape, Stop, Trip, TripStopTimes } from './types.js';
import { FloatColumn, groupAndSort, IntColumn } from './columns.js';
import { missingColumn } from './missingColumn.js';
import { NotGroupedByTrip, StopTimesStore, TripFolder, type TripFolderOptions } from './stopTimesStore.js';
import {
  badField as bad,
  checkDate,
  fieldNumber,
  fieldTimeS,
  fieldUint,
  intField as intIn,
  requiredField as need,
  TIME_EXPECTED,
} from './values.js';
import { CALENDAR_COLUMNS, CALENDAR_DATES_COLUMNS, calendarDateRow, calendarRow } from './calendarRows.js';
import { STOP_TIMES_OPTIONAL, STOP_TIMES_REQUIRED, StopTimesRowReader, type StopTimesLookup } from './stopTimesRows.js';

export interface ReadFeedOptions {
  /** 'auto' (default): the Monday-Friday date with the most trips; 'YYYY-MM-DD'; 'all': every trip. */
  date?: string;
  /** Keep only these routes (route_id or route_short_name). */
  routes?: string[];
  onProgress?: OnProgress;
  limits?: ArchiveLimits & { maxRecordChars?: number };
  download?: DownloadLimits;
  /** Headers, cache and proxy settings of a download (see FetchOptions). */
  fetch?: FetchOptions;
  /** Where warnings are counted (a fresh sink by default); Feed.warnings lists them either way. */
  warnings?: WarningSink;
  /**
   * With date 'all': every trip is read (and shown to tripRows), but only the trips running on this day
   * are held in Feed.stopTimes (Feed.held names it); Feed.trips still lists every trip with rows. Given as
   * a date, or chosen from the calendar and the trips before stop_times.txt is read; null holds every trip.
   */
  holdDay?: string | ((tables: HoldDayTables) => string | null);
  /** Sees every kept trip's rows once (see TripRowsSink). */
  tripRows?: TripRowsSink;
}

/** What a holdDay chooser sees: the calendar, and trip runs per service_id (frequencies expanded) of every trip in trips.txt. */
export interface HoldDayTables {
  calendar: CalendarRow[];
  calendarDates: CalendarDate[];
  runsPerService: Map<string, number>;
}

/**
 * Where each kept trip's stop_times rows are shown as they are read, whether the trip is held or not:
 * rows(k, trip, rows) once per trip that has rows, k its place among the kept trips (trips.txt order), in
 * the order the table gives them, the rows valid during the call only. When the table turns out not to be
 * grouped by trip, restart() is called and every trip is shown again, in order, from a second reading.
 */
export interface TripRowsSink {
  rows(k: number, trip: Trip, rows: TripStopTimes): void;
  restart(): void;
}

const REQUIRED_TABLES = ['agency.txt', 'routes.txt', 'trips.txt', 'stop_times.txt', 'stops.txt'];

/**
 * Caps on the shapes read (only those of the day's trips are held, about 65 bytes a point while read):
 * the longest real shapes have a few thousand points (3 097 on the Long Island Rail Road feed), and whole
 * networks' shapes.txt about 150 000 rows (the New York subway's).
 */
export const SHAPE_CAPS = { pointsPerShape: 200_000, points: 4_000_000 } as const;

/**
 * Cap on the trips read from trips.txt: every trip is held (id, route, service, headsign, shape and
 * direction) until the analysis date says which run, a few hundred bytes each. Manhattan's buses have
 * 37 872 trips and six copies of them with the subway 247 853; the cap is about twice that.
 */
export const MAX_TRIPS = 500_000;

/** Reads the feed at source (a .zip path, a folder of .txt files or an http(s) URL). */
export async function readFeed(
  source: string,
  {
    date = 'auto',
    routes,
    onProgress,
    limits = {},
    download,
    fetch,
    warnings = new WarningSink(),
    holdDay,
    tripRows,
  }: ReadFeedOptions = {},
): Promise<Feed> {
  if (typeof date !== 'string' || (date !== 'auto' && date !== 'all' && !/^\d{4}-\d{2}-\d{2}$/.test(date))) {
    throw new StopspanError('bad-option', `invalid option date: expected 'auto', 'all' or YYYY-MM-DD, got ${String(date)}`, {
      value: String(date),
    });
  }
  if (date !== 'auto' && date !== 'all') isoToGtfsDate(date);
  if (holdDay !== undefined && date !== 'all') {
    throw new StopspanError('bad-option', "invalid option holdDay: it goes with date 'all'", { value: String(date) });
  }
  if (typeof holdDay === 'string') isoToGtfsDate(holdDay, 'holdDay');
  if (routes !== undefined && (!Array.isArray(routes) || routes.some((r) => typeof r !== 'string'))) {
    throw new StopspanError('bad-option', 'invalid option routes: expected a list of route ids', { value: String(routes) });
  }
  const { maxRecordChars, ...archiveLimits } = limits;
  const archive = await openFeed(source, { limits: archiveLimits, download, fetch, warnings, onProgress });
  const early = new Map<string, Promise<Readable>>();
  try {
    // a URL's user name and password are not kept: the source is printed, written in reports and histories
    return await readArchive(archive, shownUrl(source), { date, routes, onProgress, maxRecordChars, warnings, early, holdDay, tripRows });
  } finally {
    // a table opened early and never read (the reading stopped at an error before it) is let go
    for (const p of early.values())
      p.then(
        (s) => s.destroy(),
        () => {},
      );
    await archive.close();
  }
}

interface Ctx {
  archive: FeedArchive;
  warnings: WarningSink;
  onProgress?: OnProgress;
  maxRecordChars?: number;
  rowCounts: Record<string, number>;
  /** Tables opened ahead of their turn. */
  early: Map<string, Promise<Readable>>;
}

type Columns<R extends string, O extends string> = Record<R, number> & Record<O, number>;

/** Column indices by name from a table's header; -1 for an absent optional column; a missing required one is an error. */
function columnIndex<R extends string, O extends string>(
  file: string,
  header: string[],
  required: readonly R[],
  optional: readonly O[],
): Columns<R, O> {
  const at = new Map(header.map((h, i) => [h, i]));
  const c: Record<string, number> = {};
  for (const r of required) {
    const i = at.get(r);
    if (i === undefined) throw missingColumn(file, header, r, { known: new Set<string>([...required, ...optional]) });
    c[r] = i;
  }
  for (const o of optional) c[o] = at.get(o) ?? -1;
  return c as Columns<R, O>;
}

/** Streams one table, mapping column names to indices once; -1 for an absent optional column. */
async function table<R extends string, O extends string>(
  ctx: Ctx,
  file: string,
  required: readonly R[],
  optionalColumns: readonly O[],
  onRow: (row: CsvRow, col: Columns<R, O>, header: string[]) => void,
  groupKey?: CsvGroupKey,
): Promise<void> {
  let col = {} as Columns<R, O>;
  let head: string[] = [];
  const total = ctx.archive.size(file);
  const optional = !REQUIRED_TABLES.includes(file);
  // an optional table with no header (zero bytes, or only a byte-order mark or blank lines) reads as absent
  const absent = (): void => {
    ctx.warnings.add('empty-table', file);
    ctx.rowCounts[file] = 0;
  };
  if (total === 0 && optional) return absent();
  let noHeader = false;
  const stage = `read ${file}`;
  ctx.onProgress?.({ stage, done: 0, total, unit: 'bytes' });
  const early = ctx.early.get(file);
  ctx.early.delete(file);
  const stream = await (early ?? ctx.archive.open(file));
  const stats = await readCsv(stream, {
    file,
    warnings: ctx.warnings,
    maxRecordChars: ctx.maxRecordChars,
    onBytes: (done) => ctx.onProgress?.({ stage, done, total, unit: 'bytes' }),
    onHeader(header) {
      if (header.length === 0 && optional) {
        noHeader = true;
        return;
      }
      head = header;
      col = columnIndex(file, header, required, optionalColumns);
    },
    onRow: (row) => onRow(row, col, head),
    groupKey,
  });
  if (noHeader) return absent();
  ctx.rowCounts[file] = stats.records;
}

/** How far stop_times.txt may inflate ahead of its reader: 32 MiB. */
const STOP_TIMES_READ_AHEAD = 32 << 20;

/**
 * A promise started ahead of its use: a rejection is held until the promise is awaited (and dropped when
 * reading stops earlier), instead of surfacing as unhandled.
 */
function settled<T>(p: Promise<T>): Promise<T> {
  p.catch(() => {});
  return p;
}

function coord(file: string, row: CsvRow, i: number, column: string, limit: number): number {
  const v = fieldNumber(row, i);
  if (v === null || Math.abs(v) > limit) bad(file, row, i, column, `a coordinate within ±${limit}`);
  return v;
}

/** trips.txt as columns, row k per trip in the order read (see readTrips). */
interface TripColumns {
  tripId: string[];
  tripRoute: string[];
  tripService: string[];
  tripHeadsign: string[];
  tripShape: string[];
  tripDirection: number[];
}

/** The service tables: calendar.txt and calendar_dates.txt, each empty when absent. */
interface Calendars {
  calendar: CalendarRow[];
  calendarDates: CalendarDate[];
}

async function readArchive(
  archive: FeedArchive,
  source: string,
  {
    date,
    routes: routeFilter,
    onProgress,
    maxRecordChars,
    warnings,
    early,
    holdDay,
    tripRows,
  }: {
    date: string;
    routes?: string[];
    onProgress?: OnProgress;
    maxRecordChars?: number;
    warnings: WarningSink;
    early: Map<string, Promise<Readable>>;
    holdDay?: ReadFeedOptions['holdDay'];
    tripRows?: TripRowsSink;
  },
): Promise<Feed> {
  checkTables(archive);
  const ctx: Ctx = { archive, warnings, onProgress, maxRecordChars, rowCounts: {}, early };
  openStopTimesEarly(ctx);
  const hashing = settled(archive.contentHash());

  const agencies = await readAgencies(ctx);
  const routes = await readRoutes(ctx);
  const { stops, stopIndex } = await readStops(ctx);
  const { calendar, calendarDates } = await readCalendars(ctx);
  const tripCols = await readTrips(ctx, routes);
  const frequencies = await readFrequencies(ctx);
  const feedInfo = await readFeedInfo(ctx);

  const routeKeep = routeFilter && routeFilter.length > 0 ? routeIdsKept(routes, routeFilter) : null;
  // rows of the trips of the routes asked for
  const candidates: number[] = [];
  for (let k = 0; k < tripCols.tripId.length; k++) if (!routeKeep || routeKeep.has(tripCols.tripRoute[k])) candidates.push(k);
  const { analysisDate, kept } = tripsKept(tripCols, candidates, date, { calendar, calendarDates }, frequencies);
  warnBlankFields(kept, tripCols, candidates, { calendar, calendarDates }, warnings);

  const day = heldDay(holdDay, tripCols, candidates, { calendar, calendarDates }, frequencies);
  const hold = day === null ? undefined : holdMask(kept, { calendar, calendarDates }, day);
  const { stopTimes, hadRows, held } = await readStopTimes(ctx, kept, stops, stopIndex, { hold, sink: tripRows });
  const trips = new Map<string, Trip>();
  kept.forEach((t, k) => {
    if (hadRows(k)) trips.set(t.id, t);
  });
  if (trips.size === 0) throw new StopspanError('empty-feed', 'no kept trip has any stop_times rows', { file: 'stop_times.txt' });
  const shapes = await readShapes(ctx, trips);

  onProgress?.({ stage: 'hash feed' });
  const contentHash = await hashing;
  const feed: Feed = {
    source,
    date: analysisDate,
    contentHash,
    agencies,
    routes,
    stops,
    stopIndex,
    trips,
    stopTimes,
    shapes,
    calendar,
    calendarDates,
    frequencies,
    feedInfo,
    warnings: warnings.list(),
    rowCounts: ctx.rowCounts,
  };
  if (held && day !== null) feed.held = day;
  return feed;
}

/** The required tables, and a calendar of either kind, are in the archive. */
function checkTables(archive: FeedArchive): void {
  for (const t of REQUIRED_TABLES) {
    if (!archive.has(t)) throw new StopspanError('missing-table', `required table ${t} is missing from the feed`, { file: t });
  }
  if (!archive.has('calendar.txt') && !archive.has('calendar_dates.txt')) {
    throw new StopspanError('missing-table', 'the feed has neither calendar.txt nor calendar_dates.txt', { file: 'calendar.txt' });
  }
}

/**
 * stop_times.txt, by far the biggest table, starts inflating now, on the thread pool, while this thread
 * parses the tables it depends on (measured on Manhattan: see README, Speed and memory); the read-ahead
 * is bounded, so memory is too.
 */
function openStopTimesEarly(ctx: Ctx): void {
  if (ctx.archive.has('stop_times.txt')) {
    // an error while nobody reads the stream yet is kept in the stream (its reader then throws it), not
    // raised as an unhandled 'error' event
    const opening = ctx.archive.open('stop_times.txt', { readAheadBytes: STOP_TIMES_READ_AHEAD }).then((s) => s.on('error', () => {}));
    ctx.early.set('stop_times.txt', settled(opening));
  }
}

/** agency.txt [GTFS Schedule reference: agency_name and agency_timezone required; agency_id optional for one agency] */
async function readAgencies(ctx: Ctx): Promise<Agency[]> {
  const agencies: Agency[] = [];
  await table(ctx, 'agency.txt', ['agency_name', 'agency_timezone'], ['agency_id'], (row, c) => {
    agencies.push({ id: row.get(c.agency_id), name: row.get(c.agency_name), timezone: row.get(c.agency_timezone) });
  });
  return agencies;
}

/** routes.txt, by route_id; a repeated route_id is counted and passed over. */
async function readRoutes(ctx: Ctx): Promise<Map<string, Route>> {
  const { warnings } = ctx;
  const routes = new Map<string, Route>();
  await table(ctx, 'routes.txt', ['route_id', 'route_type'], ['agency_id', 'route_short_name', 'route_long_name'], (row, c) => {
    const id = need('routes.txt', row, c.route_id, 'route_id');
    const type = intIn('routes.txt', row, c.route_type, 'route_type', 0, 1702, -1);
    if (type < 0) bad('routes.txt', row, c.route_type, 'route_type', 'a route type');
    if (routes.has(id)) return warnings.add('duplicate-route-id', `routes.txt:${row.line}`);
    routes.set(id, {
      id,
      agencyId: row.get(c.agency_id),
      shortName: row.get(c.route_short_name),
      longName: row.get(c.route_long_name),
      type,
    });
  });
  return routes;
}

/** stops.txt, in file order with an index by stop_id; a repeated stop_id is counted and passed over. */
async function readStops(ctx: Ctx): Promise<{ stops: Stop[]; stopIndex: Map<string, number> }> {
  const { warnings } = ctx;
  const stops: Stop[] = [];
  const stopIndex = new Map<string, number>();
  const STOPS_COLUMNS = new Set(['stop_id', 'stop_code', 'stop_name', 'stop_lat', 'stop_lon', 'location_type', 'parent_station']);
  await table(
    ctx,
    'stops.txt',
    ['stop_id'],
    ['stop_code', 'stop_name', 'stop_lat', 'stop_lon', 'location_type', 'parent_station'],
    (row, c, stopsHeader) => {
      const id = need('stops.txt', row, c.stop_id, 'stop_id');
      const locationType = intIn('stops.txt', row, c.location_type, 'location_type', 0, 4, 0);
      if (locationType <= 2 && (c.stop_lat < 0 || c.stop_lon < 0)) {
        throw missingColumn('stops.txt', stopsHeader, c.stop_lat < 0 ? 'stop_lat' : 'stop_lon', {
          why: ' (stops need coordinates)',
          known: STOPS_COLUMNS,
        });
      }
      const lat = c.stop_lat < 0 ? NaN : coord('stops.txt', row, c.stop_lat, 'stop_lat', 90);
      const lon = c.stop_lon < 0 ? NaN : coord('stops.txt', row, c.stop_lon, 'stop_lon', 180);
      // [GTFS Schedule reference: stop_lat/stop_lon required for location_type 0, 1 and 2]
      if (locationType <= 2 && (Number.isNaN(lat) || Number.isNaN(lon))) {
        const i = Number.isNaN(lat) ? c.stop_lat : c.stop_lon;
        throw new StopspanError('bad-value', `${Number.isNaN(lat) ? 'stop_lat' : 'stop_lon'} is required for a stop, station or entrance`, {
          file: 'stops.txt',
          line: row.line,
          column: Number.isNaN(lat) ? 'stop_lat' : 'stop_lon',
          value: row.get(i),
        });
      }
      if (stopIndex.has(id)) return warnings.add('duplicate-stop-id', `stops.txt:${row.line}`);
      stopIndex.set(id, stops.length);
      stops.push({
        id,
        code: row.get(c.stop_code),
        name: row.get(c.stop_name),
        lat,
        lon,
        locationType,
        parentStation: row.get(c.parent_station),
      });
    },
  );
  return { stops, stopIndex };
}

/** calendar.txt [GTFS Schedule reference: weekday flags 0/1, start_date and end_date YYYYMMDD, end inclusive] and calendar_dates.txt. */
async function readCalendars(ctx: Ctx): Promise<Calendars> {
  const { archive, warnings } = ctx;
  const calendar: CalendarRow[] = [];
  if (archive.has('calendar.txt')) {
    await table(ctx, 'calendar.txt', CALENDAR_COLUMNS, [], (row, c) => {
      calendar.push(calendarRow(row, c, warnings));
    });
  }
  const calendarDates: CalendarDate[] = [];
  if (archive.has('calendar_dates.txt')) {
    await table(ctx, 'calendar_dates.txt', CALENDAR_DATES_COLUMNS, [], (row, c) => {
      calendarDates.push(calendarDateRow(row, c));
    });
  }
  return { calendar, calendarDates };
}

/**
 * trips.txt, held as columns until the kept trips are known: on a big feed most trips do not run on
 * the analysis date, and an object for each (alive through every collection of the read) cost more
 * than parsing them; route, service, headsign and shape repeat from trip to trip: one string each,
 * shared, instead of one cut from the text per trip (which also keeps the whole text it was cut from alive)
 */
async function readTrips(ctx: Ctx, routes: Map<string, Route>): Promise<TripColumns> {
  const { warnings } = ctx;
  const tripRow = new Map<string, number>(); // trip_id -> row of the columns below
  const tripId: string[] = [];
  const tripRoute: string[] = [];
  const tripService: string[] = [];
  const tripHeadsign: string[] = [];
  const tripShape: string[] = [];
  const tripDirection: number[] = [];
  const strings = new Map<string, string>();
  const shared = (v: string): string => {
    const have = strings.get(v);
    if (have !== undefined) return have;
    const own = ownCopy(v);
    strings.set(own, own);
    return own;
  };
  // trips.txt is mostly sorted, so a column's value tends to be the row before's: then its shared string
  // is reused without cutting and hashing the value again. '\0' starts each column: the CSV reader refuses
  // NUL, so no value equals it.
  const lastRoute = { v: '\0' };
  const lastService = { v: '\0' };
  const lastHeadsign = { v: '\0' };
  const lastShape = { v: '\0' };
  const sharedField = (row: CsvRow, i: number, last: { v: string }): string => {
    if (!row.equals(i, last.v)) last.v = shared(row.get(i));
    return last.v;
  };
  let unknownRoute = 0;
  await table(ctx, 'trips.txt', ['route_id', 'service_id', 'trip_id'], ['direction_id', 'trip_headsign', 'shape_id'], (row, c) => {
    // a trip_id is kept (every trip's, for 'all'): its own copy, not a view holding the chunk of trips.txt
    const id = ownCopy(need('trips.txt', row, c.trip_id, 'trip_id'));
    // a route_id is checked when it changes; an unknown one is not kept as the row before's
    const routeBefore = lastRoute.v;
    const routeId = sharedField(row, c.route_id, lastRoute);
    if (routeId !== routeBefore && !routes.has(routeId)) {
      lastRoute.v = '\0';
      unknownRoute++;
      return warnings.add('trip-unknown-route', `trips.txt:${row.line} route_id ${routeId}`);
    }
    if (tripRow.has(id)) return warnings.add('duplicate-trip-id', `trips.txt:${row.line}`);
    if (tripId.length >= MAX_TRIPS) {
      throw new StopspanError('feed-too-large', `trips.txt has more than ${MAX_TRIPS} trips, the cap`, {
        file: 'trips.txt',
        line: row.line,
        column: 'trip_id',
        value: id,
      });
    }
    tripRow.set(id, tripId.length);
    tripId.push(id);
    tripDirection.push(intIn('trips.txt', row, c.direction_id, 'direction_id', 0, 1, -1));
    tripRoute.push(routeId);
    tripService.push(sharedField(row, c.service_id, lastService));
    tripHeadsign.push(sharedField(row, c.trip_headsign, lastHeadsign));
    tripShape.push(sharedField(row, c.shape_id, lastShape));
  });
  if (tripId.length === 0 && unknownRoute > 0) {
    throw new StopspanError('bad-reference', 'every trip names a route_id that is not in routes.txt', {
      file: 'trips.txt',
      column: 'route_id',
    });
  }
  return { tripId, tripRoute, tripService, tripHeadsign, tripShape, tripDirection };
}

/** The trip at row k of the trip columns, as a record. */
function tripAt({ tripId, tripRoute, tripService, tripDirection, tripHeadsign, tripShape }: TripColumns, k: number): Trip {
  return {
    id: tripId[k],
    routeId: tripRoute[k],
    serviceId: tripService[k],
    directionId: tripDirection[k],
    headsign: tripHeadsign[k],
    shapeId: tripShape[k],
  };
}

/** frequencies.txt [GTFS Schedule reference: exact_times 0 or empty = frequency-based, 1 = schedule-based] */
async function readFrequencies(ctx: Ctx): Promise<Frequency[]> {
  const { warnings } = ctx;
  const frequencies: Frequency[] = [];
  if (ctx.archive.has('frequencies.txt')) {
    await table(ctx, 'frequencies.txt', ['trip_id', 'start_time', 'end_time', 'headway_secs'], ['exact_times'], (row, c) => {
      const startS = fieldTimeS(row, c.start_time);
      if (startS < 0) bad('frequencies.txt', row, c.start_time, 'start_time', TIME_EXPECTED);
      const endS = fieldTimeS(row, c.end_time);
      if (endS < 0) bad('frequencies.txt', row, c.end_time, 'end_time', TIME_EXPECTED);
      const headwayS = intIn('frequencies.txt', row, c.headway_secs, 'headway_secs', 1, 1e9, -1);
      if (headwayS < 0) bad('frequencies.txt', row, c.headway_secs, 'headway_secs', 'a positive integer');
      const exactTimes = intIn('frequencies.txt', row, c.exact_times, 'exact_times', 0, 1, 0) as 0 | 1;
      if (endS <= startS) warnings.add('frequency-empty-window', `frequencies.txt:${row.line}`);
      frequencies.push({ tripId: row.get(c.trip_id), startS, endS, headwayS, exactTimes });
    });
  }
  return frequencies;
}

/** feed_info.txt's first row, or null without the table. */
async function readFeedInfo(ctx: Ctx): Promise<FeedInfo | null> {
  let feedInfo: FeedInfo | null = null;
  if (ctx.archive.has('feed_info.txt')) {
    await table(ctx, 'feed_info.txt', [], ['feed_publisher_name', 'feed_version', 'feed_start_date', 'feed_end_date'], (row, c) => {
      feedInfo ??= {
        publisherName: row.get(c.feed_publisher_name),
        version: row.get(c.feed_version),
        startDate: row.get(c.feed_start_date),
        endDate: row.get(c.feed_end_date),
      };
    });
  }
  return feedInfo;
}

/** The routes filter: the route_ids it names, each by route_id or route_short_name. */
function routeIdsKept(routes: Map<string, Route>, routeFilter: string[]): Set<string> {
  const routeKeep = new Set<string>();
  for (const want of routeFilter) {
    const hits = [...routes.values()].filter((r) => r.id === want || r.shortName === want);
    if (hits.length === 0)
      throw new StopspanError('bad-option', `invalid option routes: no route has id or short name ${want}`, { value: want });
    for (const r of hits) routeKeep.add(r.id);
  }
  return routeKeep;
}

/** The analysis date (null for 'all') and the trips kept: the candidates whose service runs that day. */
function tripsKept(
  tripCols: TripColumns,
  candidates: number[],
  date: string,
  { calendar, calendarDates }: Calendars,
  frequencies: Frequency[],
): { analysisDate: string | null; kept: Trip[] } {
  const { tripService } = tripCols;
  let analysisDate: string | null = null;
  let kept: Trip[];
  if (date === 'all') {
    kept = candidates.map((k) => tripAt(tripCols, k));
  } else {
    if (date === 'auto') {
      analysisDate = defaultAnalysisDate({ calendar, calendarDates }, candidateRuns(tripCols, candidates, frequencies));
      if (!analysisDate)
        throw new StopspanError('empty-feed', 'no Monday-Friday date in the service range has any trip', { file: 'calendar.txt' });
    } else {
      analysisDate = date;
    }
    const on = servicesOn({ calendar, calendarDates }, analysisDate);
    kept = candidates.filter((k) => on.has(tripService[k])).map((k) => tripAt(tripCols, k));
    if (kept.length === 0) throw new StopspanError('empty-feed', `no trip runs on ${analysisDate}`, { value: analysisDate });
  }
  if (kept.length === 0) throw new StopspanError('empty-feed', 'the feed has no trips', { file: 'trips.txt' });
  return { analysisDate, kept };
}

/** Blank optional fields the later stages lean on, counted: direction_id, a known service_id, shape_id. */
function warnBlankFields(
  kept: Trip[],
  { tripId, tripService }: TripColumns,
  candidates: number[],
  { calendar, calendarDates }: Calendars,
  warnings: WarningSink,
): void {
  const noDirection = kept.filter((t) => t.directionId < 0);
  if (noDirection.length > 0) warnings.add('blank-direction-id', noDirection[0].id, noDirection.length);
  const known = new Set([...calendar.map((c) => c.serviceId), ...calendarDates.map((d) => d.serviceId)]);
  const noService = candidates.filter((k) => !known.has(tripService[k]));
  if (noService.length > 0) warnings.add('trip-unknown-service', tripId[noService[0]], noService.length);
  const noShape = kept.filter((t) => t.shapeId === '').length;
  if (noShape > 0) warnings.add('trip-without-shape', kept.find((t) => t.shapeId === '')!.id, noShape);
}

/** Trip runs a day per service_id of the candidate trips (trips.txt rows), frequencies expanded. */
function candidateRuns({ tripId, tripService }: TripColumns, candidates: number[], frequencies: Frequency[]): Map<string, number> {
  return runsPerService(frequencies, (visit) => {
    for (const k of candidates) visit(tripId[k], tripService[k]);
  });
}

/** The day whose trips are held (holdDay, asked or chosen from the small tables), or null to hold every trip. */
function heldDay(
  holdDay: ReadFeedOptions['holdDay'],
  tripCols: TripColumns,
  candidates: number[],
  calendars: Calendars,
  frequencies: Frequency[],
): string | null {
  if (typeof holdDay !== 'function') return holdDay ?? null;
  const day = holdDay({ ...calendars, runsPerService: candidateRuns(tripCols, candidates, frequencies) });
  if (day !== null) isoToGtfsDate(day, 'holdDay');
  return day;
}

/** 1 for each kept trip whose service runs on day, else 0. */
function holdMask(kept: Trip[], calendars: Calendars, day: string): Uint8Array {
  const on = servicesOn(calendars, day);
  const hold = new Uint8Array(kept.length);
  kept.forEach((t, k) => {
    if (on.has(t.serviceId)) hold[k] = 1;
  });
  return hold;
}

/**
 * stop_times.txt, kept trips only, each trip shown to the sink and folded into a shared profile (if held)
 * as its run of rows ends. A table not grouped by trip is read again, holding every trip, and its trips
 * are shown to the sink afterwards; `held` then says the hold was given up.
 */
async function readStopTimes(
  ctx: Ctx,
  kept: Trip[],
  stops: Stop[],
  stopIndex: Map<string, number>,
  { hold, sink }: { hold?: Uint8Array; sink?: TripRowsSink },
): Promise<{ stopTimes: StopTimesStore; hadRows: (k: number) => boolean; held: boolean }> {
  const onTrip = sink && ((k: number, rows: TripStopTimes) => sink.rows(k, kept[k], rows));
  try {
    return { ...(await readStopTimesOnce(ctx, kept, stops, stopIndex, { hold, onTrip })), held: hold !== undefined };
  } catch (e) {
    if (!(e instanceof NotGroupedByTrip)) throw e;
  }
  sink?.restart();
  const whole = await readStopTimesOnce(ctx, kept, stops, stopIndex, {});
  if (sink) {
    kept.forEach((t, k) => {
      const rows = whole.stopTimes.get(t.id);
      if (rows) sink.rows(k, t, rows);
    });
  }
  return { ...whole, held: false };
}

/** One reading of stop_times.txt into a TripFolder. */
async function readStopTimesOnce(
  ctx: Ctx,
  kept: Trip[],
  stops: Stop[],
  stopIndex: Map<string, number>,
  folding: TripFolderOptions,
): Promise<{ stopTimes: StopTimesStore; hadRows: (k: number) => boolean }> {
  const { warnings } = ctx;
  const tripIdx = new Map<string, number>();
  kept.forEach((t, k) => tripIdx.set(t.id, k));
  const folder = new TripFolder(kept.length, folding);
  const F = 'stop_times.txt';
  const station = new Uint8Array(stops.length);
  for (let k = 0; k < stops.length; k++) if (stops[k].locationType === 1) station[k] = 1;
  const lookup: StopTimesLookup = { tripIdx, stopIndex, station };
  // one pass on this thread: inflating already runs beside it on the thread pool; parsing in blocks on
  // two worker threads as well was measured slower in total and no faster in wall time on two cores.
  // Rows of trips not kept are passed over by the CSV reader, a trip's run at a time.
  const reader = new StopTimesRowReader(lookup, folder);
  await table(ctx, F, STOP_TIMES_REQUIRED, STOP_TIMES_OPTIONAL, (row, c) => reader.read(row, c), {
    column: 'trip_id',
    keep: (id) => reader.startTrip(id),
  });
  folder.finish();
  if (reader.atStation > 0) warnings.add('stop-time-at-station', F, reader.atStation);
  if (folder.scattered) warnings.add('stop-times-not-grouped', F);
  const stopTimes = new StopTimesStore(
    kept.map((t) => t.id),
    tripIdx,
    folder.profileOfTrip,
    folder.baseOfTrip,
    folder.interner.profiles,
  );
  warnTripTimes(folder, reader, kept.length, warnings);
  return { stopTimes, hadRows: (k) => folder.hadRows(k) };
}

/** Trips whose stop_times repeat a stop_sequence, lack a time at an end, or have no rows, counted (held or not). */
function warnTripTimes(folder: TripFolder, reader: StopTimesRowReader, tripCount: number, warnings: WarningSink): void {
  const F = 'stop_times.txt';
  let noTimes = 0;
  let noRows = 0;
  for (let k = 0; k < tripCount; k++) {
    if (!folder.hadRows(k)) noRows++;
    else if (folder.endUntimed(k)) noTimes++;
  }
  const repeated = folder.repeated + reader.repeated;
  if (repeated > 0) warnings.add('repeated-stop-sequence', F, repeated);
  if (noTimes > 0) warnings.add('trip-end-without-time', F, noTimes);
  if (noRows > 0) warnings.add('trip-without-stop-times', F, noRows);
}

/** shapes.txt, only the shapes the kept trips use; those named and not found are counted. */
async function readShapes(ctx: Ctx, trips: Map<string, Trip>): Promise<Map<string, Shape>> {
  const shapes = new Map<string, Shape>();
  const wanted = new Map<string, number>();
  const shapeIds: string[] = [];
  for (const t of trips.values()) {
    if (t.shapeId !== '' && !wanted.has(t.shapeId)) {
      wanted.set(t.shapeId, shapeIds.length);
      shapeIds.push(t.shapeId);
    }
  }
  if (ctx.archive.has('shapes.txt') && shapeIds.length > 0) {
    const S = 'shapes.txt';
    const owner = new IntColumn(1 << 14);
    const seqC = new IntColumn(1 << 14);
    const lat = new FloatColumn(1 << 14);
    const lon = new FloatColumn(1 << 14);
    const dist = new FloatColumn(1 << 14);
    const pointsOf = new Int32Array(shapeIds.length);
    await table(ctx, S, ['shape_id', 'shape_pt_lat', 'shape_pt_lon', 'shape_pt_sequence'], ['shape_dist_traveled'], (row, c) => {
      const g = wanted.get(row.get(c.shape_id));
      if (g === undefined) return;
      if (++pointsOf[g] > SHAPE_CAPS.pointsPerShape || owner.length >= SHAPE_CAPS.points) {
        const what =
          pointsOf[g] > SHAPE_CAPS.pointsPerShape
            ? `a shape has more than ${SHAPE_CAPS.pointsPerShape} points`
            : `the shapes in use have more than ${SHAPE_CAPS.points} points`;
        throw new StopspanError('feed-too-large', `${what}, the cap`, { file: S, line: row.line, column: 'shape_id', value: shapeIds[g] });
      }
      const seq = fieldUint(row, c.shape_pt_sequence);
      if (seq < 0) bad(S, row, c.shape_pt_sequence, 'shape_pt_sequence', 'a non-negative integer');
      const la = coord(S, row, c.shape_pt_lat, 'shape_pt_lat', 90);
      const lo = coord(S, row, c.shape_pt_lon, 'shape_pt_lon', 180);
      if (Number.isNaN(la) || Number.isNaN(lo))
        bad(S, row, Number.isNaN(la) ? c.shape_pt_lat : c.shape_pt_lon, Number.isNaN(la) ? 'shape_pt_lat' : 'shape_pt_lon', 'a coordinate');
      let d = NaN;
      if (c.shape_dist_traveled >= 0 && !row.isBlank(c.shape_dist_traveled)) {
        const v = fieldNumber(row, c.shape_dist_traveled);
        if (v === null || v < 0) bad(S, row, c.shape_dist_traveled, 'shape_dist_traveled', 'a non-negative number');
        d = v;
      }
      owner.push(g);
      seqC.push(seq);
      lat.push(la);
      lon.push(lo);
      dist.push(d);
    });
    const { order, offsets } = groupAndSort(owner.data, seqC.data, owner.length, shapeIds.length);
    for (let g = 0; g < shapeIds.length; g++) {
      const a = offsets[g];
      const b = offsets[g + 1];
      if (a === b) continue;
      const m = b - a;
      const sh: Shape = { id: shapeIds[g], lat: new Float64Array(m), lon: new Float64Array(m), dist: new Float64Array(m) };
      for (let q = 0; q < m; q++) {
        const r = order[a + q];
        sh.lat[q] = lat.data[r];
        sh.lon[q] = lon.data[r];
        sh.dist[q] = dist.data[r];
      }
      shapes.set(sh.id, sh);
    }
  }
  const missingShapes = shapeIds.filter((id) => !shapes.has(id));
  if (missingShapes.length > 0) ctx.warnings.add('shape-not-found', missingShapes[0], missingShapes.length);
  return shapes;
}
