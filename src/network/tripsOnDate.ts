// Which trips run on a date and how many times (frequencies expanded), from the feed's calendar,
// calendar_dates and frequencies. The network stage needs it when the reader kept every trip (Feed.date
// is null) and for counting trips per day; exact_times=0 frequencies count as nominal trips.

import type { Feed } from '../gtfs/types.js';
import { StopspanError } from '../common/errors.js';

export interface TripInstances {
  count: number; // trips run on the date (1 for a trip without frequencies)
  nominal: number; // of count, how many come from exact_times=0 frequencies
}

const DATE_RE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** Service ids running on a date (YYYY-MM-DD): calendar weekday within [start, end], then calendar_dates. */
export function servicesOnDate(feed: Pick<Feed, 'calendar' | 'calendarDates'>, date: string): Set<string> {
  const m = DATE_RE.exec(date);
  if (!m) throw new StopspanError('bad-option', `invalid option date: expected YYYY-MM-DD, got ${date}`, { value: date });
  const ymd = `${m[1]}${m[2]}${m[3]}`;
  const d = new Date(Date.UTC(+m[1], +m[2] - 1, +m[3]));
  if (d.getUTCMonth() !== +m[2] - 1 || d.getUTCDate() !== +m[3]) {
    throw new StopspanError('bad-option', `invalid option date: expected a calendar date, got ${date}`, { value: date });
  }
  const weekday = (d.getUTCDay() + 6) % 7; // monday = 0
  const on = new Set<string>();
  for (const c of feed.calendar) {
    if (c.days[weekday] && c.start <= ymd && ymd <= c.end) on.add(c.serviceId);
  }
  for (const cd of feed.calendarDates) {
    if (cd.date !== ymd) continue;
    if (cd.exceptionType === 1) on.add(cd.serviceId);
    else on.delete(cd.serviceId);
  }
  return on;
}

/**
 * Trip instances on a date for the trips in feed.stopTimes: trips whose service runs that day, with
 * frequencies.txt expanded (trips start at start + k*headway while before end).
 */
export function tripsOnDate(feed: Feed, date: string): Map<string, TripInstances> {
  const services = servicesOnDate(feed, date);
  const freqByTrip = new Map<string, { count: number; nominal: number }>();
  for (const f of feed.frequencies) {
    if (!(f.headwayS > 0) || !(f.endS > f.startS)) continue;
    const n = Math.ceil((f.endS - f.startS) / f.headwayS);
    const acc = freqByTrip.get(f.tripId) ?? { count: 0, nominal: 0 };
    acc.count += n;
    if (f.exactTimes === 0) acc.nominal += n;
    freqByTrip.set(f.tripId, acc);
  }
  const out = new Map<string, TripInstances>();
  for (const tripId of feed.stopTimes.keys()) {
    const trip = feed.trips.get(tripId);
    if (!trip || !services.has(trip.serviceId)) continue;
    const f = freqByTrip.get(tripId);
    out.set(tripId, f ? { count: f.count, nominal: f.nominal } : { count: 1, nominal: 0 });
  }
  return out;
}
