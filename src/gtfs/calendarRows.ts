// One converter per calendar table row (calendar.txt, calendar_dates.txt), used by the feed reader and by
// the context reader alike, so every feed's calendar is read by one rule: weekday flags 0 or 1 (a blank one
// is an error, not a 0), dates YYYYMMDD that exist, exception_type 1 or 2, service_id required
// [GTFS Schedule reference: calendar.txt, calendar_dates.txt].

import type { WarningSink } from '../common/warnings.js';
import type { CsvRow } from './csvCore.js';
import type { CalendarDate, CalendarRow } from './types.js';
import { badField, checkDate, intField, requiredField } from './values.js';

export const WEEKDAYS = ['monday', 'tuesday', 'wednesday', 'thursday', 'friday', 'saturday', 'sunday'] as const;
/** The columns calendar.txt must have. */
export const CALENDAR_COLUMNS = ['service_id', ...WEEKDAYS, 'start_date', 'end_date'] as const;
/** The columns calendar_dates.txt must have. */
export const CALENDAR_DATES_COLUMNS = ['service_id', 'date', 'exception_type'] as const;

/**
 * A calendar.txt row (c: column name -> index). `where` names the row in a warning's detail (the feed's
 * label before the file, for a context feed); an end before the start is a counted warning.
 */
export function calendarRow(row: CsvRow, c: Record<string, number>, warnings: WarningSink, where = ''): CalendarRow {
  const file = 'calendar.txt';
  const days = WEEKDAYS.map((d) => intField(file, row, c[d], d, 0, 1, -1) === 1) as CalendarRow['days'];
  for (const d of WEEKDAYS) if (row.isBlank(c[d])) badField(file, row, c[d], d, '0 or 1');
  const start = checkDate(row.get(c.start_date)) ?? badField(file, row, c.start_date, 'start_date', 'a date YYYYMMDD');
  const end = checkDate(row.get(c.end_date)) ?? badField(file, row, c.end_date, 'end_date', 'a date YYYYMMDD');
  if (end < start) warnings.add('calendar-end-before-start', `${where}${file}:${row.line}`);
  return { serviceId: requiredField(file, row, c.service_id, 'service_id'), days, start, end };
}

/** A calendar_dates.txt row (c: column name -> index). */
export function calendarDateRow(row: CsvRow, c: Record<string, number>): CalendarDate {
  const file = 'calendar_dates.txt';
  const date = checkDate(row.get(c.date)) ?? badField(file, row, c.date, 'date', 'a date YYYYMMDD');
  const e = intField(file, row, c.exception_type, 'exception_type', 1, 2, -1);
  if (e < 0) badField(file, row, c.exception_type, 'exception_type', '1 or 2');
  return { serviceId: requiredField(file, row, c.service_id, 'service_id'), date, exceptionType: e as 1 | 2 };
}
