// Which services run on a date, by the GTFS Schedule rules: a calendar.txt row runs on its weekdays from
// start_date to end_date inclusive; calendar_dates.txt exception_type 1 adds the service on that date and
// 2 removes it; calendar_dates may stand alone. Also the feed's service range and the one rule for the
// analysis date of every command (chooseAnalysisDate; defaultAnalysisDate when nothing else is asked).

import { StopspanError } from '../common/errors.js';
import type { CalendarDate, CalendarRow, Feed } from './types.js';

type CalendarTables = Pick<Feed, 'calendar' | 'calendarDates'>;

const ISO_RE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** 'YYYY-MM-DD' -> 'YYYYMMDD', checking that the date exists. */
export function isoToGtfsDate(date: string, param = 'date'): string {
  const m = ISO_RE.exec(date);
  const ok = m && new Date(Date.UTC(+m[1], +m[2] - 1, +m[3])).getUTCDate() === +m[3] && +m[2] >= 1 && +m[2] <= 12;
  if (!m || !ok) throw new StopspanError('bad-option', `invalid option ${param}: expected a date YYYY-MM-DD, got ${date}`, { value: date });
  return `${m[1]}${m[2]}${m[3]}`;
}

export function gtfsToIsoDate(ymd: string): string {
  return `${ymd.slice(0, 4)}-${ymd.slice(4, 6)}-${ymd.slice(6, 8)}`;
}

/** Monday = 0 .. Sunday = 6 for a YYYYMMDD date. */
export function weekdayOf(ymd: string): number {
  const d = new Date(Date.UTC(+ymd.slice(0, 4), +ymd.slice(4, 6) - 1, +ymd.slice(6, 8)));
  return (d.getUTCDay() + 6) % 7;
}

function addDays(ymd: string, n: number): string {
  const d = new Date(Date.UTC(+ymd.slice(0, 4), +ymd.slice(4, 6) - 1, +ymd.slice(6, 8) + n));
  return `${d.getUTCFullYear()}${String(d.getUTCMonth() + 1).padStart(2, '0')}${String(d.getUTCDate()).padStart(2, '0')}`;
}

/** Service ids running on date (YYYY-MM-DD). */
export function servicesOn(feed: CalendarTables, date: string): Set<string> {
  const ymd = isoToGtfsDate(date);
  return servicesOnGtfsDate(feed.calendar, feed.calendarDates, ymd);
}

function servicesOnGtfsDate(calendar: CalendarRow[], calendarDates: CalendarDate[], ymd: string): Set<string> {
  const wd = weekdayOf(ymd);
  const on = new Set<string>();
  for (const c of calendar) if (c.days[wd] && c.start <= ymd && ymd <= c.end) on.add(c.serviceId);
  for (const cd of calendarDates) {
    if (cd.date !== ymd) continue;
    if (cd.exceptionType === 1) on.add(cd.serviceId);
    else on.delete(cd.serviceId);
  }
  return on;
}

/** First and last date (YYYY-MM-DD) on which any service could run, or null for an empty calendar. */
export function serviceRange(feed: CalendarTables): { start: string; end: string } | null {
  let start = '';
  let end = '';
  for (const c of feed.calendar) {
    if (!start || c.start < start) start = c.start;
    if (!end || c.end > end) end = c.end;
  }
  for (const cd of feed.calendarDates) {
    if (cd.exceptionType !== 1) continue;
    if (!start || cd.date < start) start = cd.date;
    if (!end || cd.date > end) end = cd.date;
  }
  return start ? { start: gtfsToIsoDate(start), end: gtfsToIsoDate(end) } : null;
}

/** Longest service range scanned for the default date, in days (about two years). */
export const MAX_SCAN_DAYS = 800;

/**
 * The Monday-Friday date inside the service range with the most trips (ties: the earliest), given the
 * number of trip runs per service per day. Null when no weekday has any trip.
 */
export function defaultAnalysisDate(feed: CalendarTables, runsPerService: Map<string, number>): string | null {
  const range = serviceRange(feed);
  if (!range) return null;
  let ymd = isoToGtfsDate(range.start);
  const last = isoToGtfsDate(range.end);
  // index calendar_dates by date so each day costs the calendar rows plus its own exceptions
  const byDate = new Map<string, CalendarDate[]>();
  for (const cd of feed.calendarDates) {
    const list = byDate.get(cd.date);
    if (list) list.push(cd);
    else byDate.set(cd.date, [cd]);
  }
  let best: string | null = null;
  let bestTrips = 0;
  for (let k = 0; k < MAX_SCAN_DAYS && ymd <= last; k++, ymd = addDays(ymd, 1)) {
    if (weekdayOf(ymd) > 4) continue;
    const on = servicesOnGtfsDate(feed.calendar, byDate.get(ymd) ?? [], ymd);
    let trips = 0;
    for (const s of on) trips += runsPerService.get(s) ?? 0;
    if (trips > bestTrips) {
      bestTrips = trips;
      best = ymd;
    }
  }
  return best ? gtfsToIsoDate(best) : null;
}

/** How far after the run date `check` looks for a day with service: one week, so a weekday-only feed checked on a weekend finds the Monday (GTFS best practice: a feed covers at least the next 7 days). */
export const NEXT_SERVICE_WINDOW_DAYS = 7;

/** Why a date was analysed: asked for, the run date, the first day with service after it, the default, or none found. */
export type DateBasis = 'asked' | 'run-date' | 'next-service-day' | 'busiest-weekday' | 'none';

export interface AnalysisDay {
  date: string | null; // YYYY-MM-DD, null when no day qualifies
  basis: DateBasis;
  because: string; // one line for people
}

/**
 * The one rule for the analysis date of every command. `date` when given (a day on which nothing runs is
 * an error, as for the audit); else, with a run date `today`, that day or the first day with service in the
 * NEXT_SERVICE_WINDOW_DAYS after it; else the default analysis date (defaultAnalysisDate). Days count trip
 * runs per service, frequencies expanded.
 */
export function chooseAnalysisDate(
  feed: CalendarTables,
  runsPerService: Map<string, number>,
  options: { date?: string; today?: string; windowDays?: number } = {},
): AnalysisDay {
  const { date, today, windowDays = NEXT_SERVICE_WINDOW_DAYS } = options;
  const runsOn = (ymd: string): number => {
    let n = 0;
    for (const s of servicesOnGtfsDate(feed.calendar, feed.calendarDates, ymd)) n += runsPerService.get(s) ?? 0;
    return n;
  };
  if (date !== undefined) {
    if (runsOn(isoToGtfsDate(date, '--date')) === 0) throw new StopspanError('empty-feed', `no trip runs on ${date}`);
    return { date, basis: 'asked', because: 'the date asked for with --date' };
  }
  if (today !== undefined) {
    const from = isoToGtfsDate(today, '--today');
    for (let k = 0; k <= windowDays; k++) {
      const ymd = addDays(from, k);
      if (runsOn(ymd) === 0) continue;
      return k === 0
        ? { date: today, basis: 'run-date', because: `the run date ${today}` }
        : {
            date: gtfsToIsoDate(ymd),
            basis: 'next-service-day',
            because: `the first day with service after the run date ${today}, on which nothing runs`,
          };
    }
    return { date: null, basis: 'none', because: `nothing runs on the run date ${today} or in the ${windowDays} days after it` };
  }
  const best = defaultAnalysisDate(feed, runsPerService);
  return best
    ? { date: best, basis: 'busiest-weekday', because: "the Monday-Friday date with the most trips in the feed's service range" }
    : { date: null, basis: 'none', because: 'no Monday-Friday date in the service range has any trip' };
}
