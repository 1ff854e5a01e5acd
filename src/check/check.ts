// Feed-quality check: runs every finding of the table in findings.ts over a read feed and its patterns
// and returns counts and a few examples per finding, for people and for nightly jobs' exit codes.

import { haversineM } from '../network/geodesy.js';
import { coordinateFault } from '../gtfs/coordinateFault.js';
import type { Feed, Stop, Trip, TripStopTimes } from '../gtfs/types.js';
import type { TripRowsSink } from '../gtfs/readFeed.js';
import type { Pattern, PatternSet } from '../network/types.js';
import { cruiseSpeedBoundsMps, estimateCruiseSpeed } from '../model/cruiseSpeed.js';
import { defaultParams } from '../model/params.js';
import { StopspanError } from '../common/errors.js';
import type { AnalysisDay } from '../gtfs/calendar.js';
import { median } from '../common/median.js';
import { WARNINGS, type WarningEntry } from '../common/warningCodes.js';
import { medianGapM, passengerStopsServed } from '../network/patternFigures.js';
import { firstBacktrack } from '../network/shapeDistUnit.js';
import {
  FINDINGS,
  FINDING_CODES,
  SEVERITY_RANK,
  normaliseThresholds,
  speedFamily,
  type CheckThresholds,
  type FindingCode,
  type Severity,
  type ThresholdOptions,
} from './findings.js';

export interface FindingExample {
  file: string; // the GTFS table the example lives in, e.g. 'stops.txt'
  line?: number; // when the reader told us
  ids: Record<string, string>; // e.g. { stop_id: '123' } or { trip_id: 'T1', stop_sequence: '4' }
  detail: string; // one line for people
}

export interface Finding {
  code: FindingCode;
  title: string;
  severity: Severity;
  explanation: string;
  count: number;
  examples: FindingExample[];
}

export interface CheckReport {
  feed: { source: string; contentHash: string; version: string; publisher: string };
  today: string; // YYYY-MM-DD the run was judged against
  /** Last day with service (YYYY-MM-DD), or null when the calendar has none. */
  serviceEnd: string | null;
  thresholds: CheckThresholds;
  /** Only the findings with count > 0, most severe first, then in table order. */
  findings: Finding[];
  /** Every code, zero included: what a history row stores. */
  counts: Record<FindingCode, number>;
  bySeverity: Record<Severity, number>; // how many findings (kinds, not occurrences) at each severity
  /** The date the pattern checks ran on and why that one (the run date's service day unless --date). */
  analysis: AnalysisDay;
  /** The patterns checked, on their analysis date: counts and the median gap, for the history's trend. */
  network: { date: string; patterns: number; stopsServed: number; tripsPerDay: number; medianGapM: number | null };
  /**
   * What the context feeds (--context) say about the checked network: each feed's stations and services on
   * the analysis date, and the stops served within walking distance of one of their stations (transfer
   * points the audit keeps), counted with a few examples; null without context feeds.
   */
  context: CheckContext | null;
}

export interface CheckContext {
  feeds: { label: string; stations: number; servicesOnDate: number | null }[];
  stopsNearStations: number;
  examples: { stopId: string; stopName: string; station: string }[];
}

export interface CheckOptions {
  today?: string; // YYYY-MM-DD; defaults to the current UTC date
  thresholds?: ThresholdOptions;
  maxExamples?: number; // per finding, default 5
  severities?: Partial<Record<FindingCode, Severity>>; // overrides of the table's defaults
  /** How the patterns' date was chosen (chooseAnalysisDate); default: the patterns' own date, as asked for. */
  analysis?: AnalysisDay;
  /** The context feeds read for the patterns' date and the served stops near their stations (contextStops in src/network/contextStations.ts). */
  context?: { feeds: { label: string; stations: number; servicesOnDate: number | null }[]; near: ReadonlyMap<number, string> };
  /**
   * The per-trip findings gathered while the feed was read (a TripFindings given to readFeed as tripRows,
   * with the same maxExamples); without it they are gathered from feed.stopTimes, which then must hold
   * every trip (a feed read with holdDay does not).
   */
  tripFindings?: TripFindings;
}

/** Runs every check. Pure: the same feed, patterns and options give the same report. */
export function checkFeed(feed: Feed, patterns: PatternSet, options: CheckOptions = {}): CheckReport {
  const { today = new Date().toISOString().slice(0, 10), thresholds: thresholdOptions, maxExamples = 5, severities = {} } = options;
  const analysis: AnalysisDay =
    options.analysis ??
    (patterns.date
      ? { date: patterns.date, basis: 'asked', because: 'the date the patterns were built for' }
      : { date: null, basis: 'none', because: 'no analysis date' });
  if (!/^\d{4}-\d{2}-\d{2}$/.test(today) || Number.isNaN(Date.parse(today + 'T00:00:00Z'))) {
    throw new StopspanError('bad-option', `invalid option today: expected YYYY-MM-DD, got ${today}`, { value: today });
  }
  if (!Number.isInteger(maxExamples) || maxExamples < 0) {
    throw new StopspanError('bad-option', `invalid option maxExamples: expected an integer >= 0, got ${maxExamples}`, {
      value: String(maxExamples),
    });
  }
  for (const [code, sev] of Object.entries(severities)) {
    if (!(code in FINDINGS) || !(sev in SEVERITY_RANK)) {
      throw new StopspanError('bad-option', `invalid option severities: expected finding code and error|warning|info, got ${code}=${sev}`, {
        value: `${code}=${sev}`,
      });
    }
  }
  const t = normaliseThresholds(thresholdOptions);
  const perTrip = options.tripFindings ?? tripFindingsOf(feed, maxExamples);
  if (perTrip.maxExamples !== maxExamples) {
    throw new StopspanError('bad-option', `invalid option tripFindings: gathered for ${perTrip.maxExamples} examples, not ${maxExamples}`, {
      value: String(perTrip.maxExamples),
    });
  }

  const tally = new Map<FindingCode, { count: number; examples: FindingExample[] }>();
  for (const code of FINDING_CODES) tally.set(code, { count: 0, examples: [] });
  const add = (code: FindingCode, example: FindingExample | null, n = 1): void => {
    const e = tally.get(code)!;
    e.count += n;
    if (example && e.examples.length < maxExamples) e.examples.push(example);
  };

  if (patterns.patterns.length === 0) {
    // a check that looked at no pattern has checked nothing: say so at error severity
    add('no-service', {
      file: 'calendar.txt',
      ids: analysis.date ? { date: analysis.date } : {},
      detail: analysis.date ? `no trip with stop_times runs on ${analysis.date} (${analysis.because})` : analysis.because,
    });
  }
  checkPatternGeometry(feed, patterns, t, add);
  perTrip.addTo(add);
  checkShapes(feed, add);
  checkSpeeds(feed, patterns, t, add);
  checkCoordinates(feed, t, add);
  const serviceEnd = lastServiceDate(feed);
  checkServiceEnd(serviceEnd, today, t, add);
  checkReferences(feed, add);

  const findings: Finding[] = [];
  const counts = {} as Record<FindingCode, number>;
  const bySeverity: Record<Severity, number> = { error: 0, warning: 0, info: 0 };
  for (const code of FINDING_CODES) {
    const { count, examples } = tally.get(code)!;
    counts[code] = count;
    if (count === 0) continue;
    const kind = FINDINGS[code];
    const severity = severities[code] ?? kind.severity;
    bySeverity[severity]++;
    findings.push({ code, title: kind.title, severity, explanation: kind.explanation, count, examples });
  }
  findings.sort(
    (a, b) => SEVERITY_RANK[b.severity] - SEVERITY_RANK[a.severity] || FINDING_CODES.indexOf(a.code) - FINDING_CODES.indexOf(b.code),
  );

  return {
    feed: {
      source: feed.source,
      contentHash: feed.contentHash,
      version: feed.feedInfo?.version ?? '',
      publisher: feed.feedInfo?.publisherName ?? '',
    },
    today,
    serviceEnd: serviceEnd ? `${serviceEnd.slice(0, 4)}-${serviceEnd.slice(4, 6)}-${serviceEnd.slice(6, 8)}` : null,
    thresholds: t,
    findings,
    counts,
    bySeverity,
    analysis,
    network: networkFigures(patterns),
    context: options.context ? contextFigures(feed, options.context, maxExamples) : null,
  };
}

function contextFigures(feed: Feed, context: NonNullable<CheckOptions['context']>, maxExamples: number): CheckContext {
  const examples = [...context.near]
    .map(([i, station]) => ({ stopId: feed.stops[i]?.id ?? '', stopName: feed.stops[i]?.name ?? '', station }))
    .sort((a, b) => a.stopId.localeCompare(b.stopId))
    .slice(0, maxExamples);
  return {
    feeds: context.feeds.map((f) => ({ label: f.label, stations: f.stations, servicesOnDate: f.servicesOnDate })),
    stopsNearStations: context.near.size,
    examples,
  };
}

function networkFigures(set: PatternSet): CheckReport['network'] {
  let trips = 0;
  for (const p of set.patterns) trips += p.tripsPerDay;
  return {
    date: set.date,
    patterns: set.patterns.length,
    stopsServed: passengerStopsServed(set),
    tripsPerDay: trips,
    medianGapM: medianGapM(set),
  };
}

/** Counts n of a finding (1 by default) and keeps its example, if any, while fewer than maxExamples are kept. */
type Add = (code: FindingCode, example: FindingExample | null, n?: number) => void;

const fmt = (x: number, digits = 1): string => (Number.isFinite(x) ? x.toFixed(digits) : String(x));

/** twin-stops and stop-off-path, once per stop pair or per (shape, stop). */
function checkPatternGeometry(feed: Feed, patterns: PatternSet, t: CheckThresholds, add: Add): void {
  const seenPairs = new Set<string>();
  const seenOff = new Set<string>();
  for (const p of patterns.patterns) {
    for (let i = 0; i + 1 < p.stopIdx.length; i++) {
      const a = feed.stops[p.stopIdx[i]];
      const b = feed.stops[p.stopIdx[i + 1]];
      if (!a || !b) continue;
      const d = haversineM(a.lat, a.lon, b.lat, b.lon);
      if (!(d < t.twinStopM)) continue;
      const key = a.id < b.id ? `${a.id}\u0000${b.id}` : `${b.id}\u0000${a.id}`;
      if (seenPairs.has(key)) continue;
      seenPairs.add(key);
      add('twin-stops', {
        file: 'stops.txt',
        ids: { stop_id: a.id, next_stop_id: b.id, pattern: p.id },
        detail: `${a.id} and ${b.id} are ${fmt(d)} m apart on pattern ${p.id}`,
      });
    }
    for (let i = 0; i < p.stopIdx.length; i++) {
      const off = p.offsetFromShapeM[i];
      if (off === null || off === undefined || !(off > t.offPathM)) continue;
      const stop = feed.stops[p.stopIdx[i]];
      const key = `${p.shapeId}\u0000${p.stopIdx[i]}`;
      if (seenOff.has(key)) continue;
      seenOff.add(key);
      add('stop-off-path', {
        file: 'stops.txt',
        ids: { stop_id: stop?.id ?? String(p.stopIdx[i]), shape_id: p.shapeId },
        detail: `stop ${stop?.id} is ${fmt(off, 0)} m from shape ${p.shapeId} (pattern ${p.id})`,
      });
    }
  }
}

/** The findings drawn from one trip's rows alone, in the order they are counted. */
const TRIP_CODES = ['pathless-trip', 'distance-backtrack', 'time-backtrack'] as const;
type TripCode = (typeof TRIP_CODES)[number];

/**
 * pathless-trip, distance-backtrack and time-backtrack of one trip (at most one of each), from its rows
 * alone: trip is its trips.txt record, if there is one.
 */
export function tripFindings(tripId: string, trip: Trip | undefined, st: TripStopTimes): { code: TripCode; example: FindingExample }[] {
  const found: { code: TripCode; example: FindingExample }[] = [];
  if (trip && trip.shapeId === '') {
    found.push({
      code: 'pathless-trip',
      example: { file: 'trips.txt', ids: { trip_id: tripId }, detail: `trip ${tripId} has no shape_id` },
    });
  }
  const back = firstBacktrack(st.shapeDist, DIST_TOLERANCE);
  if (back >= 0) {
    found.push({
      code: 'distance-backtrack',
      example: {
        file: 'stop_times.txt',
        ids: { trip_id: tripId, stop_sequence: String(st.seq[back]) },
        detail: `trip ${tripId}: shape_dist_traveled falls from ${lastFiniteBefore(st.shapeDist, back)} to ${st.shapeDist[back]} at stop_sequence ${st.seq[back]}`,
      },
    });
  }
  const time = timeBacktrack(st);
  if (time) {
    found.push({
      code: 'time-backtrack',
      example: {
        file: 'stop_times.txt',
        ids: { trip_id: tripId, stop_sequence: String(st.seq[time.at]) },
        detail: `trip ${tripId} at stop_sequence ${st.seq[time.at]}: ${time.bad}`,
      },
    });
  }
  return found;
}

/** The first stop where a trip's time runs backwards (departure before arrival, or before the stop before), and how. */
function timeBacktrack(st: TripStopTimes): { at: number; bad: string } | null {
  let prevS = -1;
  for (let i = 0; i < st.arrS.length; i++) {
    const a = st.arrS[i];
    const dep = st.depS[i];
    const first = a >= 0 ? a : dep;
    if (a >= 0 && dep >= 0 && dep < a) return { at: i, bad: `departure ${clock(dep)} before arrival ${clock(a)}` };
    if (first >= 0 && prevS >= 0 && first < prevS) return { at: i, bad: `${clock(first)} after ${clock(prevS)} at the previous stop` };
    const last = dep >= 0 ? dep : a;
    if (last >= 0) prevS = last;
  }
  return null;
}

/**
 * The per-trip findings of a feed, gathered a trip at a time in any order (as readFeed shows them to its
 * tripRows): exact counts, and per finding the examples of the first maxExamples trips by their place k
 * among the feed's trips, so the report is the same whatever order the trips come in; never more.
 */
export class TripFindings implements TripRowsSink {
  private readonly gathered = new Map<TripCode, { count: number; examples: { k: number; example: FindingExample }[] }>();

  constructor(readonly maxExamples = 5) {
    this.restart();
  }

  rows(k: number, trip: Trip, rows: TripStopTimes): void {
    this.add(k, trip.id, trip, rows);
  }

  /** Trip tripId, at place k, with these rows. */
  add(k: number, tripId: string, trip: Trip | undefined, rows: TripStopTimes): void {
    for (const { code, example } of tripFindings(tripId, trip, rows)) {
      const g = this.gathered.get(code)!;
      g.count++;
      const ex = g.examples;
      if (ex.length === this.maxExamples && (ex.length === 0 || ex[ex.length - 1].k < k)) continue;
      let at = ex.length;
      while (at > 0 && ex[at - 1].k > k) at--;
      ex.splice(at, 0, { k, example });
      if (ex.length > this.maxExamples) ex.pop();
    }
  }

  restart(): void {
    for (const code of TRIP_CODES) this.gathered.set(code, { count: 0, examples: [] });
  }

  /** Counts the gathered findings, examples in order of place. */
  addTo(add: Add): void {
    for (const code of TRIP_CODES) {
      const { count, examples } = this.gathered.get(code)!;
      for (const { example } of examples) add(code, example);
      if (count > examples.length) add(code, null, count - examples.length);
    }
  }
}

/** The per-trip findings of every trip in feed.stopTimes, in its order. */
function tripFindingsOf(feed: Feed, maxExamples: number): TripFindings {
  if (feed.held !== undefined) {
    throw new StopspanError(
      'bad-option',
      `invalid option tripFindings: the feed holds the trips of ${feed.held} only, so they must be given`,
      {
        value: feed.held,
      },
    );
  }
  const found = new TripFindings(maxExamples);
  let k = 0;
  for (const [tripId, st] of feed.stopTimes) found.add(k++, tripId, feed.trips.get(tripId), st);
  return found;
}

/** distance-backtrack of shapes, once per shape. */
function checkShapes(feed: Feed, add: Add): void {
  for (const shape of feed.shapes.values()) {
    const back = firstBacktrack(shape.dist, DIST_TOLERANCE);
    if (back >= 0) {
      add('distance-backtrack', {
        file: 'shapes.txt',
        ids: { shape_id: shape.id, point: String(back + 1) },
        detail: `shape ${shape.id}: shape_dist_traveled falls from ${lastFiniteBefore(shape.dist, back)} to ${shape.dist[back]} at point ${back + 1}`,
      });
    }
  }
}

/** A fall in shape_dist_traveled smaller than this is taken as rounding, not a backtrack. */
const DIST_TOLERANCE = 1e-9;

/** The last value before index i that is not blank: the one a backtrack falls from. */
function lastFiniteBefore(dist: ArrayLike<number>, i: number): number {
  for (let k = i - 1; k >= 0; k--) if (Number.isFinite(dist[k])) return dist[k];
  return NaN;
}

function clock(s: number): string {
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const sec = s % 60;
  return `${String(h).padStart(2, '0')}:${String(m).padStart(2, '0')}:${String(sec).padStart(2, '0')}`;
}

/**
 * implausible-speed, per pattern, between consecutive timed stops (timepoints whose time was not
 * interpolated). Gaps with zero scheduled time (minute-rounded schedules) are merged with the next one
 * until time passes, so rounding alone never makes a speed infinite.
 */
function checkSpeeds(feed: Feed, patterns: PatternSet, t: CheckThresholds, add: Add): void {
  for (const p of patterns.patterns) {
    const route = feed.routes.get(p.routeId);
    if (!route) continue;
    const fam = speedFamily(route.type);
    const { minKmh, maxKmh } = t.speedKmh[fam];
    const n = p.stopIdx.length;
    if (p.gapRunTimeS.length !== n - 1) continue;
    let from = -1; // index of the timed stop the current span starts at
    let spanS = 0;
    let spanM = 0;
    let flagged = false;
    for (let i = 0; i < n && !flagged; i++) {
      const timed = p.timepoint[i] === true;
      if (from >= 0) {
        spanS += p.gapRunTimeS[i - 1];
        spanM += p.distAlongM[i] - p.distAlongM[i - 1];
        if (p.gapTimeInterpolated[i - 1]) {
          // an interpolated time inside the span: the span is not measured; restart at the next timed stop
          from = -1;
        }
      }
      if (!timed) continue;
      if (from >= 0 && spanS > 0 && spanM > 0) {
        const kmh = (spanM / spanS) * 3.6;
        if (kmh > maxKmh || (kmh < minKmh && spanM >= t.slowMinSpanM)) {
          const a = feed.stops[p.stopIdx[from]];
          const b = feed.stops[p.stopIdx[i]];
          add('implausible-speed', {
            file: 'stop_times.txt',
            ids: { pattern: p.id, trip_id: p.tripIds[0] ?? '', from_stop_id: a?.id ?? '', to_stop_id: b?.id ?? '' },
            detail: `pattern ${p.id} (${fam}): ${fmt(kmh)} km/h from ${a?.id} to ${b?.id} (${fmt(spanM, 0)} m in ${spanS} s; allowed ${minKmh}-${maxKmh})`,
          });
          flagged = true; // one per pattern: the count is of patterns
        }
      }
      if (from < 0 || spanS > 0) {
        from = i;
        spanS = 0;
        spanM = 0;
      }
    }
    if (!flagged) checkWholeRunTime(feed, p, fam, add);
  }
}

/**
 * implausible-speed over a whole pattern: a run time shorter than any plausible cruise speed explains
 * once the bus brakes, opens its doors and pulls away at its stops and riders board. The same test the
 * audit applies before it falls back to the route type's typical cruise speed (estimateCruiseSpeed), with
 * the audit's defaults: every intermediate stop served, the default door time, rates and re-entry delay,
 * and the assumed boardings per trip-km.
 */
function checkWholeRunTime(feed: Feed, p: Pattern, fam: string, add: Add): void {
  const route = feed.routes.get(p.routeId);
  let first = 0;
  let last = p.stopIdx.length - 1;
  while (first < last && p.passengerStop[first] === false) first++;
  while (last > first && p.passengerStop[last] === false) last--;
  const lengthM = p.distAlongM[last] - p.distAlongM[first];
  if (!(p.runTimeS > 0) || !(lengthM > 0) || !route) return;
  let inner = 0;
  for (let i = first + 1; i < last; i++) if (p.passengerStop[i] !== false) inner++;
  const d = defaultParams();
  const est = estimateCruiseSpeed({
    runTimeS: p.runTimeS,
    lengthM,
    expectedStopsServed: inner,
    boardingsPerTrip: d.assumed_boardings_per_trip_km * (lengthM / 1000),
    doorTimeS: d.door_time_s,
    reentryDelayS: d.reentry_delay_s,
    accelMps2: d.accel_mps2,
    decelMps2: d.decel_mps2,
    routeType: route.type,
  });
  if (est.basis !== 'implausible') return;
  const { maxMps } = cruiseSpeedBoundsMps(route.type);
  const a = feed.stops[p.stopIdx[first]];
  const b = feed.stops[p.stopIdx[last]];
  add('implausible-speed', {
    file: 'stop_times.txt',
    ids: { pattern: p.id, trip_id: p.tripIds[0] ?? '', from_stop_id: a?.id ?? '', to_stop_id: b?.id ?? '' },
    detail: `pattern ${p.id} (${fam}): ${fmt(lengthM, 0)} m with ${inner} stops between in ${p.runTimeS} s is faster than any cruise speed up to ${fmt(maxMps * 3.6)} km/h explains once the bus stops and riders board (model defaults)`,
  });
}

/** coordinate-fault: the coordinateFault rule (not numbers, out of range, zero, near a pole), or far from the feed's median stop position. */
function checkCoordinates(feed: Feed, t: CheckThresholds, add: Add): void {
  const located = (s: Stop) => !((s.locationType === 3 || s.locationType === 4) && Number.isNaN(s.lat) && Number.isNaN(s.lon));
  const valid: Stop[] = [];
  for (const s of feed.stops) {
    if (!located(s)) continue;
    const fault = coordinateFault(s.lat, s.lon);
    if (fault) {
      add('coordinate-fault', { file: 'stops.txt', ids: { stop_id: s.id }, detail: `stop ${s.id} at (${s.lat}, ${s.lon}): ${fault}` });
    } else {
      valid.push(s);
    }
  }
  if (valid.length < 3) return;
  const mLat = median(valid.map((s) => s.lat));
  const mLon = median(valid.map((s) => s.lon));
  const dists = valid.map((s) => haversineM(mLat, mLon, s.lat, s.lon));
  const limitM = Math.max(t.outlierMinKm * 1000, t.outlierFactor * median(dists));
  valid.forEach((s, i) => {
    if (dists[i] > limitM) {
      add('coordinate-fault', {
        file: 'stops.txt',
        ids: { stop_id: s.id },
        detail: `stop ${s.id} at (${s.lat}, ${s.lon}) is ${fmt(dists[i] / 1000, 0)} km from the feed's median position (limit ${fmt(limitM / 1000, 0)} km)`,
      });
    }
  });
}

/** The last YYYYMMDD on which any service runs (calendar weekdays minus removals, plus additions). */
export function lastServiceDate(feed: Feed): string | null {
  const removed = new Set<string>();
  let last = '';
  for (const cd of feed.calendarDates) {
    if (cd.exceptionType === 2) removed.add(`${cd.serviceId}\u0000${cd.date}`);
    else if (cd.date > last) last = cd.date;
  }
  for (const row of feed.calendar) {
    if (!row.days.some(Boolean) || row.end <= last) continue;
    // walk back from the end date to the last day this row really runs (at most a few weeks)
    let d = ymdToDate(row.end);
    const start = ymdToDate(row.start);
    for (let k = 0; k < 400 && d >= start; k++) {
      const ymd = dateToYmd(d);
      const weekday = (d.getUTCDay() + 6) % 7; // monday = 0
      if (row.days[weekday] && !removed.has(`${row.serviceId}\u0000${ymd}`)) {
        if (ymd > last) last = ymd;
        break;
      }
      d = new Date(d.getTime() - 86_400_000);
    }
  }
  return last || null;
}

function ymdToDate(ymd: string): Date {
  return new Date(Date.UTC(Number(ymd.slice(0, 4)), Number(ymd.slice(4, 6)) - 1, Number(ymd.slice(6, 8))));
}
function dateToYmd(d: Date): string {
  return d.toISOString().slice(0, 10).replace(/-/g, '');
}

/**
 * service-ended: the last day of service is before today; service-ending-soon: fewer than serviceMinDays
 * days of service left after today (the GTFS best practice asks for 7). A calendar with no day at all is
 * service-ended too.
 */
function checkServiceEnd(serviceEnd: string | null, today: string, t: CheckThresholds, add: Add): void {
  if (serviceEnd === null) {
    add('service-ended', { file: 'calendar.txt', ids: {}, detail: 'the calendar has no day with service at all' });
    return;
  }
  const daysLeft = Math.round((ymdToDate(serviceEnd).getTime() - Date.parse(today + 'T00:00:00Z')) / 86_400_000);
  if (daysLeft < t.serviceMinDays) {
    const endIso = `${serviceEnd.slice(0, 4)}-${serviceEnd.slice(4, 6)}-${serviceEnd.slice(6, 8)}`;
    const what = daysLeft < 0 ? `ended ${-daysLeft} day(s) before ${today}` : `ends ${daysLeft} day(s) after ${today}`;
    add(daysLeft < 0 ? 'service-ended' : 'service-ending-soon', {
      file: 'calendar.txt',
      ids: { last_service_date: serviceEnd },
      detail: `service ${what} (last day ${endIso}; at least ${t.serviceMinDays} wanted)`,
    });
  }
}

/** dangling-reference: ids that point nowhere, plus the rows the reader dropped for that reason. */
function checkReferences(feed: Feed, add: Add): void {
  for (const s of feed.stops) {
    if (s.parentStation && !feed.stopIndex.has(s.parentStation)) {
      add('dangling-reference', {
        file: 'stops.txt',
        ids: { stop_id: s.id, parent_station: s.parentStation },
        detail: `stop ${s.id}: parent_station ${s.parentStation} is not a stop`,
      });
    }
  }
  const services = new Set<string>();
  for (const c of feed.calendar) services.add(c.serviceId);
  for (const c of feed.calendarDates) services.add(c.serviceId);
  for (const trip of feed.trips.values()) {
    if (trip.shapeId && !feed.shapes.has(trip.shapeId)) {
      add('dangling-reference', {
        file: 'trips.txt',
        ids: { trip_id: trip.id, shape_id: trip.shapeId },
        detail: `trip ${trip.id}: shape_id ${trip.shapeId} is not in shapes.txt`,
      });
    }
    if (!services.has(trip.serviceId)) {
      add('dangling-reference', {
        file: 'trips.txt',
        ids: { trip_id: trip.id, service_id: trip.serviceId },
        detail: `trip ${trip.id}: service_id ${trip.serviceId} is in neither calendar.txt nor calendar_dates.txt`,
      });
    }
  }
  const agencyIds = new Set(feed.agencies.map((a) => a.id).filter(Boolean));
  if (agencyIds.size > 0) {
    for (const r of feed.routes.values()) {
      if (r.agencyId && !agencyIds.has(r.agencyId)) {
        add('dangling-reference', {
          file: 'routes.txt',
          ids: { route_id: r.id, agency_id: r.agencyId },
          detail: `route ${r.id}: agency_id ${r.agencyId} is not in agency.txt`,
        });
      }
    }
  }
  for (const f of feed.frequencies) {
    if (!feed.trips.has(f.tripId)) {
      add('dangling-reference', {
        file: 'frequencies.txt',
        ids: { trip_id: f.tripId },
        detail: `frequencies.txt: trip_id ${f.tripId} is not in trips.txt`,
      });
    }
  }
  for (const w of feed.warnings) {
    if (!(WARNINGS as Record<string, WarningEntry | undefined>)[w.code]?.check) continue; // the table says which the check counts
    const where = w.examples[0] ?? '';
    const m = /^([^:\s]+\.txt)(?::(\d+))?/.exec(where);
    add(
      'dangling-reference',
      {
        file: m?.[1] ?? '',
        line: m?.[2] ? Number(m[2]) : undefined,
        ids: { warning: w.code },
        detail: `${w.message} (${w.count}x${where ? ', e.g. ' + where : ''})`,
      },
      w.count,
    );
  }
}
