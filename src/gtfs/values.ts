// Typed values read straight from a CSV row's characters (GTFS times, integers) or from its field strings
// (decimals, dates), so the big tables need no string per numeric field. Each returns a sentinel for
// "blank" and for "malformed"; the table readers turn malformed values into 'bad-value' errors. Numbers
// are decimal as GTFS writes them (parseDecimal), never hexadecimal, binary or octal as JavaScript's
// Number() would read them.

import { parseDecimal } from '../common/decimal.js';
import { StopspanError } from '../common/errors.js';
import type { CsvRow } from './csvCore.js';

export const BLANK = -1;
export const MALFORMED = -2;

/**
 * The latest time of day accepted, in hours after midnight of the service day: 168 (seven days). GTFS lets
 * a trip run past 24:00:00 into the next days; no timetable runs a week on one service day, and the bound
 * keeps every time (and a trip's span) far inside the 32-bit columns that hold them.
 */
export const MAX_TIME_HOURS = 168;

/** What a time field must be, for 'bad-value' messages. */
export const TIME_EXPECTED = `a time H:MM:SS from 0:00:00 to ${MAX_TIME_HOURS}:00:00`;

/**
 * GTFS time "H:MM:SS" or "HH:MM:SS" (hours may pass 24, up to MAX_TIME_HOURS) in seconds after midnight
 * of the service day; BLANK when empty, MALFORMED when not a time (minutes and seconds must be 00-59) or later
 * than MAX_TIME_HOURS.
 */
export function fieldTimeS(row: CsvRow, i: number): number {
  if (row.isBlank(i)) return BLANK;
  const s = row.starts[i];
  if (s < 0) return timeOfString(row.quoted[i] as string, 0, (row.quoted[i] as string).length);
  return timeOfString(row.text, s, row.ends[i]);
}

export function timeOfString(t: string, a: number, e: number): number {
  let h = 0;
  let k = a;
  let digits = 0;
  while (k < e) {
    const c = t.charCodeAt(k);
    if (c === 58) break; // ':'
    if (c < 48 || c > 57) return MALFORMED;
    h = h * 10 + (c - 48);
    if (++digits > 6) return MALFORMED;
    k++;
  }
  if (digits === 0 || e - k !== 6 || t.charCodeAt(k + 3) !== 58) return MALFORMED;
  const m1 = t.charCodeAt(k + 1) - 48;
  const m2 = t.charCodeAt(k + 2) - 48;
  const s1 = t.charCodeAt(k + 4) - 48;
  const s2 = t.charCodeAt(k + 5) - 48;
  if (m1 < 0 || m1 > 5 || m2 < 0 || m2 > 9 || s1 < 0 || s1 > 5 || s2 < 0 || s2 > 9) return MALFORMED;
  const v = h * 3600 + (m1 * 10 + m2) * 60 + s1 * 10 + s2;
  return v > MAX_TIME_HOURS * 3600 ? MALFORMED : v;
}

/** A non-negative decimal integer of at most 9 digits; BLANK when empty, MALFORMED otherwise. */
export function fieldUint(row: CsvRow, i: number): number {
  if (row.isBlank(i)) return BLANK;
  const s = row.starts[i];
  const t = s < 0 ? (row.quoted[i] as string) : row.text;
  const a = s < 0 ? 0 : s;
  const e = s < 0 ? t.length : row.ends[i];
  if (e - a > 9) return MALFORMED;
  let v = 0;
  for (let k = a; k < e; k++) {
    const c = t.charCodeAt(k);
    if (c < 48 || c > 57) return MALFORMED;
    v = v * 10 + (c - 48);
  }
  return v;
}

/**
 * A finite decimal number (parseDecimal); NaN when blank, null when not a number. A quoted value of spaces
 * is not blank: it is a value that is not a number (null), never 0.
 */
export function fieldNumber(row: CsvRow, i: number): number | null {
  if (row.isBlank(i)) return Number.NaN;
  return parseDecimal(row.get(i));
}

/** A GTFS date YYYYMMDD that exists on the calendar, as given; null when malformed. */
export function checkDate(s: string): string | null {
  if (!/^\d{8}$/.test(s)) return null;
  const y = Number(s.slice(0, 4));
  const m = Number(s.slice(4, 6));
  const d = Number(s.slice(6, 8));
  const dt = new Date(Date.UTC(y, m - 1, d));
  return dt.getUTCFullYear() === y && dt.getUTCMonth() === m - 1 && dt.getUTCDate() === d ? s : null;
}

/** Throws the 'bad-value' error for field i of a row: file, line, column, what was expected and the value. */
export function badField(file: string, row: CsvRow, i: number, column: string, what: string): never {
  throw new StopspanError('bad-value', `${column} is not ${what}`, { file, line: row.line, column, value: row.get(i) });
}

/** A required field's value; blank throws the 'bad-value' error naming the file, line and column. */
export function requiredField(file: string, row: CsvRow, i: number, column: string): string {
  const v = row.get(i);
  if (v === '') throw new StopspanError('bad-value', `${column} is required but blank`, { file, line: row.line, column, value: '' });
  return v;
}

/** An optional integer column within [lo, hi]; `blank` when absent or empty. */
export function intField(file: string, row: CsvRow, i: number, column: string, lo: number, hi: number, blank: number): number {
  if (i < 0) return blank;
  const v = fieldUint(row, i);
  if (v === BLANK) return blank;
  if (v === MALFORMED || v < lo || v > hi) badField(file, row, i, column, `an integer from ${lo} to ${hi}`);
  return v;
}
