// The network a command models, loaded one way for every command: the feed read and its route patterns
// built on the analysis date. loadDayNetwork reads one day's trips (audit and whatif: the date asked for,
// else the Monday-Friday date with the most trips, readFeed's rule); loadNetwork reads for check and
// compare, which choose the date by the one rule of chooseAnalysisDate (the run date's service day for
// check) and may need every trip of the feed. A day with no route pattern is an error here, once. The
// pattern builder loads while the feed is read, so the module loader's file reads overlap the reading.

import { StopspanError, isStopspanError } from '../common/errors.js';
import type { HoldDayTables, TripRowsSink } from '../gtfs/readFeed.js';
import { chooseAnalysisDate, isoToGtfsDate, type AnalysisDay } from '../gtfs/calendar.js';
import { runsPerService } from '../gtfs/frequencies.js';
import type { OnProgress } from '../common/progress.js';
import type { FetchOptions } from '../gtfs/download.js';
import { readFeed } from '../gtfs/readFeed.js';
import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from './types.js';

export interface DayNetwork {
  feed: Feed;
  patterns: PatternSet;
}

/** Reads the feed's trips of one day (`date`, YYYY-MM-DD, else the busiest weekday) and builds their patterns. */
export async function loadDayNetwork(
  source: string,
  options: { date?: string; onProgress?: OnProgress; fetch?: FetchOptions } = {},
): Promise<DayNetwork> {
  const { date, onProgress, fetch } = options;
  const building = loadBuilder();
  const feed = await readFeed(source, { date: date ?? 'auto', onProgress, fetch });
  const { buildPatterns } = await building;
  const patterns = buildPatterns(feed, { date: feed.date ?? undefined, onProgress });
  if (patterns.patterns.length === 0) {
    throw new StopspanError('empty-feed', `no route patterns run on ${patterns.date}`, { file: 'trips.txt' });
  }
  return { feed, patterns };
}

export interface LoadedNetwork {
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
export async function loadNetwork(
  source: string,
  options: {
    date?: string;
    today?: string;
    onProgress?: OnProgress;
    dayOnly?: boolean;
    fetch?: FetchOptions;
    tripRows?: TripRowsSink;
  } = {},
): Promise<LoadedNetwork> {
  const { date: asked, today, onProgress, dayOnly = false, fetch, tripRows } = options;
  if (asked !== undefined) isoToGtfsDate(asked, '--date');
  if (today !== undefined) isoToGtfsDate(today, '--today');
  const building = loadBuilder();
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
      const analysis = chooseAnalysisDate(day, feedRuns(day), { date: asked });
      if (analysis.date === day.date) {
        const { buildPatterns } = await building;
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
  const analysis = chooseAnalysisDate(feed, feedRuns(feed), { date: asked, today });
  if (feed.held !== undefined && feed.held !== analysis.date) {
    // trips without stop_times tipped the choice: read again holding every trip (the same trips, so the same date)
    tripRows?.restart();
    feed = await readFeed(source, { date: 'all', onProgress, fetch, tripRows });
  }
  const { buildPatterns } = await building;
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

/** Trip runs a day per service_id of the feed's trips, frequencies expanded. */
function feedRuns(feed: Feed): Map<string, number> {
  return runsPerService(feed.frequencies, (visit) => {
    for (const t of feed.trips.values()) visit(t.id, t.serviceId);
  });
}

/** The pattern builder's module, loaded when first needed (a failure to load surfaces where it is awaited). */
function loadBuilder(): Promise<typeof import('./buildPatterns.js')> {
  const building = import('./buildPatterns.js');
  building.catch(() => undefined);
  return building;
}
