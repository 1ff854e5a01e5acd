// The analysis day's network, loaded one way for every command that models a day (audit and whatif):
// the feed read for the date asked for, else the Monday-Friday date in its service range with the most
// trips (readFeed's rule), and its route patterns built on that date. A day with no route pattern is an
// error here, once. The pattern builder loads while the feed is read, so the module loader's file reads
// overlap the reading instead of delaying it.

import { StopspanError } from '../common/errors.js';
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
  const building = import('./buildPatterns.js');
  building.catch(() => undefined); // a failure to load surfaces at the await below
  const feed = await readFeed(source, { date: date ?? 'auto', onProgress, fetch });
  const { buildPatterns } = await building;
  const patterns = buildPatterns(feed, { date: feed.date ?? undefined, onProgress });
  if (patterns.patterns.length === 0) {
    throw new StopspanError('empty-feed', `no route patterns run on ${patterns.date}`, { file: 'trips.txt' });
  }
  return { feed, patterns };
}
