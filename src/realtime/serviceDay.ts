// Service-day arithmetic for matching realtime trips to the schedule: whether a service runs on a
// date (calendar + calendar_dates), and the POSIX second that GTFS times of a service day count from.

import { timeOfString } from '../gtfs/values.js';
import type { CalendarDate, CalendarRow } from '../gtfs/types.js';

/** True when serviceId runs on date (YYYYMMDD): calendar_dates type 1 adds, type 2 removes, end_date inclusive. */
export function serviceRunsOn(serviceId: string, date: string, calendar: CalendarRow[], calendarDates: CalendarDate[]): boolean {
  for (const cd of calendarDates) {
    if (cd.serviceId === serviceId && cd.date === date) return cd.exceptionType === 1;
  }
  for (const row of calendar) {
    if (row.serviceId !== serviceId) continue;
    if (date < row.start || date > row.end) continue;
    const y = Number(date.slice(0, 4));
    const m = Number(date.slice(4, 6));
    const d = Number(date.slice(6, 8));
    const jsDay = new Date(Date.UTC(y, m - 1, d)).getUTCDay(); // 0 Sunday
    if (row.days[(jsDay + 6) % 7]) return true;
  }
  return false;
}

/** Offset of the time zone from UTC at the given instant, seconds (positive east of Greenwich). */
function tzOffsetS(epochS: number, timeZone: string): number {
  const fmt = new Intl.DateTimeFormat('en-US', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
  });
  const parts: Record<string, number> = {};
  for (const p of fmt.formatToParts(new Date(epochS * 1000))) {
    if (p.type !== 'literal') parts[p.type] = Number(p.value);
  }
  const asUtc = Date.UTC(parts.year, parts.month - 1, parts.day, parts.hour, parts.minute, parts.second) / 1000;
  return Math.round(asUtc - epochS);
}

/**
 * POSIX second from which the times of a service day are counted: "noon minus 12h" in the agency's
 * time zone (GTFS Schedule reference, stop_times: times are measured from noon minus 12h, which differs
 * from midnight on days when daylight saving time changes) [C, GTFS Schedule reference].
 */
export function serviceDayOriginS(date: string, timeZone: string): number {
  const y = Number(date.slice(0, 4));
  const m = Number(date.slice(4, 6));
  const d = Number(date.slice(6, 8));
  const noonUtcGuess = Date.UTC(y, m - 1, d, 12, 0, 0) / 1000;
  let noon = noonUtcGuess - tzOffsetS(noonUtcGuess, timeZone);
  noon = noonUtcGuess - tzOffsetS(noon, timeZone); // second pass settles offsets that change near noon
  return noon - 12 * 3600;
}

/** Local calendar date (YYYYMMDD) of an instant in a time zone. */
export function localDate(epochS: number, timeZone: string): string {
  const fmt = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' });
  return fmt.format(new Date(epochS * 1000)).replace(/-/g, '');
}

/** The date (YYYYMMDD) n days after date. */
export function addDays(date: string, n: number): string {
  const t = Date.UTC(Number(date.slice(0, 4)), Number(date.slice(4, 6)) - 1, Number(date.slice(6, 8))) + n * 86400000;
  return new Date(t).toISOString().slice(0, 10).replace(/-/g, '');
}

/** Parse a GTFS time "H:MM:SS" (hours may pass 24, up to the feed reader's bound) to seconds, or null when malformed: the feed reader's rule. */
export function parseGtfsTime(s: string): number | null {
  const t = s.trim();
  const v = timeOfString(t, 0, t.length);
  return v < 0 ? null : v;
}
