// Another feed read as context beside the one audited (a subway or regional rail beside a bus feed): only
// its stations and whether it runs on the analysis date. Reads stops.txt, calendar.txt and
// calendar_dates.txt with the project's archive and CSV readers, and nothing else (stop_times.txt, the
// bulk of a feed, is never opened), so a context feed costs a few milliseconds. Its ids are namespaced by
// the feed's label ("nyct-subway:631"), so they never collide with the audited feed's or another context's.

import path from 'node:path';
import { StopspanError, isStopspanError } from '../common/errors.js';
import type { WarningSink } from '../common/warnings.js';
import { openFeed, type FeedArchive } from './archive.js';
import type { FetchOptions } from './download.js';
import { shownUrl } from './requestHeaders.js';
import { readCsv } from './csv.js';
import type { CsvRow } from './csvCore.js';
import { coordinateFault } from './coordinateFault.js';
import { servicesOn } from './calendar.js';
import { fieldNumber, intField } from './values.js';
import { CALENDAR_COLUMNS, CALENDAR_DATES_COLUMNS, calendarDateRow, calendarRow } from './calendarRows.js';
import { missingColumn } from './missingColumn.js';
import type { CalendarDate, CalendarRow } from './types.js';

export interface ContextStation {
  id: string; // namespaced: "<feed label>:<stop_id>"
  name: string;
  lat: number;
  lon: number;
}

export interface ContextFeed {
  source: string;
  label: string;
  stations: ContextStation[];
  /** Services running on the date asked for (null when no date was given). */
  servicesOnDate: number | null;
}

/** The label of a context feed: its file or folder name without .zip, or the URL's last part. */
export function contextLabel(source: string): string {
  const base = path.basename(source.replace(/[?#].*$/, '').replace(/\/+$/, '')) || 'context';
  return base.replace(/\.zip$/i, '');
}

/**
 * Reads one table of a context feed. An optional table (the calendars) with no header, zero bytes or only a
 * byte-order mark or blank lines, reads as absent and is counted under empty-table, as the feed reader does.
 */
async function readTable(
  archive: FeedArchive,
  file: string,
  required: readonly string[],
  optional: readonly string[],
  onRow: (row: CsvRow, c: Record<string, number>) => void,
  warnings: WarningSink,
  emptyAs?: string,
): Promise<void> {
  let c: Record<string, number> = {};
  let empty = false;
  await readCsv(await archive.open(file), {
    file,
    warnings,
    onHeader(header) {
      if (header.length === 0 && emptyAs !== undefined) {
        empty = true;
        return;
      }
      const at = new Map(header.map((h, i) => [h, i]));
      c = {};
      for (const r of required) {
        const i = at.get(r);
        if (i === undefined) throw missingColumn(file, header, r, { known: new Set([...required, ...optional]) });
        c[r] = i;
      }
      for (const o of optional) c[o] = at.get(o) ?? -1;
    },
    onRow: (row) => {
      if (!empty) onRow(row, c);
    },
  });
  if (empty) warnings.add('empty-table', emptyAs);
}

/**
 * A context feed's stations (stops.txt rows with location_type 1, and stops or platforms with no parent
 * station), and the count of its services running on `date` (YYYY-MM-DD) when given. An error names the
 * context feed: "context feed <source>: ...".
 */
export async function readContextFeed(
  source: string,
  { date, warnings, label = contextLabel(source), fetch }: { date?: string; warnings: WarningSink; label?: string; fetch?: FetchOptions },
): Promise<ContextFeed> {
  let archive: FeedArchive | null = null;
  try {
    archive = await openFeed(source, { warnings, fetch });
    if (!archive.has('stops.txt')) throw new StopspanError('missing-table', 'stops.txt is missing', { file: 'stops.txt' });
    const stations: ContextStation[] = [];
    await readTable(
      archive,
      'stops.txt',
      ['stop_id', 'stop_lat', 'stop_lon'],
      ['stop_name', 'location_type', 'parent_station'],
      (row, c) => {
        const type = intField('stops.txt', row, c.location_type, 'location_type', 0, 4, 0);
        const parent = c.parent_station >= 0 ? row.get(c.parent_station) : '';
        if (!(type === 1 || (type === 0 && parent === ''))) return;
        const lat = fieldNumber(row, c.stop_lat);
        const lon = fieldNumber(row, c.stop_lon);
        if (lat === null || lon === null || coordinateFault(lat, lon) !== '') {
          warnings.add('context-station-no-position', `${label} stops.txt:${row.line}`);
          return;
        }
        const id = row.get(c.stop_id);
        stations.push({ id: `${label}:${id}`, name: c.stop_name >= 0 ? row.get(c.stop_name) || id : id, lat, lon });
      },
      warnings,
    );
    let servicesOnDate: number | null = null;
    if (date !== undefined) {
      const calendar: CalendarRow[] = [];
      const calendarDates: CalendarDate[] = [];
      // the feed reader's row converters: a context feed's calendar is read by the same rule as the audited feed's
      if (archive.has('calendar.txt')) {
        await readTable(
          archive,
          'calendar.txt',
          CALENDAR_COLUMNS,
          [],
          (row, c) => calendar.push(calendarRow(row, c, warnings, `${label} `)),
          warnings,
          `${label} calendar.txt`,
        );
      }
      if (archive.has('calendar_dates.txt')) {
        await readTable(
          archive,
          'calendar_dates.txt',
          CALENDAR_DATES_COLUMNS,
          [],
          (row, c) => calendarDates.push(calendarDateRow(row, c)),
          warnings,
          `${label} calendar_dates.txt`,
        );
      }
      servicesOnDate = servicesOn({ calendar, calendarDates }, date).size;
      if (servicesOnDate === 0) warnings.add('context-no-service', `${label} on ${date}`);
    }
    return { source: shownUrl(source), label, stations, servicesOnDate };
  } catch (e) {
    if (isStopspanError(e)) {
      const ctx = e.context;
      throw new StopspanError(e.code, `context feed ${source}: ${e.message}`, {
        ...ctx,
        file: ctx.file && ctx.file !== source ? `${label}/${ctx.file}` : ctx.file,
      });
    }
    throw e;
  } finally {
    await archive?.close();
  }
}

/**
 * Every context feed given (--context, repeatable), in order, labels made distinct ("rail", "rail-2"), their
 * warnings counted in `warnings`: the one reading of context feeds for every command that takes them.
 */
export async function readContextFeeds(
  sources: readonly string[],
  { date, warnings, fetch }: { date?: string; warnings: WarningSink; fetch?: FetchOptions },
): Promise<ContextFeed[]> {
  const contexts: ContextFeed[] = [];
  const labels = new Set<string>();
  for (const source of sources) {
    let label = contextLabel(source);
    for (let k = 2; labels.has(label); k++) label = `${contextLabel(source)}-${k}`;
    labels.add(label);
    contexts.push(await readContextFeed(source, { date, warnings, label, fetch }));
  }
  return contexts;
}
