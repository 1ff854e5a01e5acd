// What the check and compare commands share: reading a feed and building its patterns for a date,
// parsing numeric options into coded errors. (Output folders are written by src/report/writeFolder.ts.)

import { parseDecimal } from '../common/decimal.js';
import { StopspanError, isStopspanError } from '../common/errors.js';
import type { OnProgress } from '../common/progress.js';
import type { Feed } from '../gtfs/types.js';
import type { FetchOptions } from '../gtfs/download.js';
import type { HoldDayTables, TripRowsSink } from '../gtfs/readFeed.js';
import { chooseAnalysisDate, isoToGtfsDate, type AnalysisDay } from '../gtfs/calendar.js';
import type { PatternSet } from '../network/types.js';

export interface LoadedFeed {
  feed: Feed;
  patterns: PatternSet;
  date: string | null; // the analysis date of the patterns; null when no day qualifies
  analysis: AnalysisDay; // the date and why it was chosen
}

/**
 * Reads every trip of a feed and builds its patterns on the date chooseAnalysisDate picks (--date, else the
 * run date's service day when `today` is given, else the default analysis date). A feed with nothing to
 * analyse still loads, with no patterns, so that check can report it; a --date on which nothing runs is an
 * error, as for the audit. With `dayOnly` (and no `today`), only the analysis date's trips are kept, as the
 * audit keeps them: the patterns, the date and its reason are the same, and the rest of the feed's trips
 * are neither held nor checked (a feed with no such date is read whole, as without it).
 *
 * With `tripRows`, every trip read is shown to it (readFeed's tripRows), and a whole read holds only the
 * trips of the date chosen by the same rule from trips.txt before stop_times.txt is read: when the trips
 * with stop_times choose another date, the feed is read again holding every trip.
 */
export async function loadFeed(
  source: string,
  options: {
    date?: string;
    today?: string;
    onProgress?: OnProgress;
    dayOnly?: boolean;
    fetch?: FetchOptions;
    tripRows?: TripRowsSink;
  } = {},
): Promise<LoadedFeed> {
  const { date: asked, today, onProgress, dayOnly = false, fetch, tripRows } = options;
  if (asked !== undefined) isoToGtfsDate(asked, '--date');
  if (today !== undefined) isoToGtfsDate(today, '--today');
  // loaded here, not with the module: the commands that import this one register at every start-up
  const [{ readFeed }, { buildPatterns }, { tripRunsPerDay }] = await Promise.all([
    import('../gtfs/readFeed.js'),
    import('../network/buildPatterns.js'),
    import('../gtfs/frequencies.js'),
  ]);
  if (dayOnly && today === undefined) {
    // the reader picks the date by the same rule (the busiest Monday-Friday date, or the one asked for)
    // and keeps that day's trips only: a whole city's other days are a hundred megabytes held for nothing
    let day: Feed | undefined;
    try {
      day = await readFeed(source, { date: asked ?? 'auto', onProgress, fetch, tripRows });
    } catch (e) {
      if (!(isStopspanError(e) && e.code === 'empty-feed')) throw e;
    }
    if (day?.date) {
      // the kept trips run on the date, so it stays the busiest of its weekdays: the same date and reason
      const runs = tripRunsPerDay(day.frequencies);
      const runsPerService = new Map<string, number>();
      for (const t of day.trips.values())
        runsPerService.set(t.serviceId, (runsPerService.get(t.serviceId) ?? 0) + (runs.get(t.id)?.count ?? 1));
      const analysis = chooseAnalysisDate(day, runsPerService, { date: asked });
      if (analysis.date === day.date) {
        try {
          return { feed: day, patterns: buildPatterns(day, { date: day.date, onProgress }), date: day.date, analysis };
        } catch (e) {
          if (!(isStopspanError(e) && e.code === 'empty-feed')) throw e;
        }
      }
    }
    // nothing to analyse (no day qualifies, or no pattern on it): read it whole, as below, for the same answer
    tripRows?.restart();
  }
  // with tripRows, the trips of the date the rule picks from trips.txt are held, the rest only shown
  const holdDay = tripRows && ((tables: HoldDayTables) => dateChosen(tables, asked, today));
  let feed = await readFeed(source, { date: 'all', onProgress, fetch, holdDay, tripRows });
  // trip runs per service, frequencies expanded: the count the audit's default date uses too
  const runs = tripRunsPerDay(feed.frequencies);
  const runsPerService = new Map<string, number>();
  for (const t of feed.trips.values())
    runsPerService.set(t.serviceId, (runsPerService.get(t.serviceId) ?? 0) + (runs.get(t.id)?.count ?? 1));
  const analysis = chooseAnalysisDate(feed, runsPerService, { date: asked, today });
  if (feed.held !== undefined && feed.held !== analysis.date) {
    // trips without stop_times tipped the choice: read again holding every trip (the same trips, so the same date)
    tripRows?.restart();
    feed = await readFeed(source, { date: 'all', onProgress, fetch, tripRows });
  }
  const date = analysis.date;
  const empty: PatternSet = { date: date ?? '', patterns: [], routesAtStop: new Map() };
  if (date === null) return { feed, patterns: empty, date, analysis };
  try {
    return { feed, patterns: buildPatterns(feed, { date, onProgress }), date, analysis };
  } catch (e) {
    if (isStopspanError(e) && e.code === 'empty-feed' && asked === undefined) return { feed, patterns: empty, date, analysis };
    throw e;
  }
}

/** The date chooseAnalysisDate picks from the tables readFeed has before stop_times.txt, or null (none, or an error it throws after). */
function dateChosen(tables: HoldDayTables, asked: string | undefined, today: string | undefined): string | null {
  try {
    return chooseAnalysisDate(tables, tables.runsPerService, { date: asked, today }).date;
  } catch (e) {
    if (isStopspanError(e)) return null;
    throw e;
  }
}

/** Parses a numeric option value, or throws bad-option naming the option. */
export function numberOption(name: string, raw: string | undefined, min = 0): number | undefined {
  if (raw === undefined) return undefined;
  const v = parseDecimal(raw);
  if (v === null || v < min) {
    throw new StopspanError('bad-option', `invalid option ${name}: expected a number >= ${min}, got ${raw}`, { value: raw });
  }
  return v;
}
