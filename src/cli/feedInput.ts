// What the check and compare commands share: reading a feed and building its patterns for a date,
// parsing numeric options into coded errors, and writing an output folder's files atomically.

import { parseDecimal } from '../common/decimal.js';
import { mkdir, rename, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { StopspanError, isStopspanError } from '../common/errors.js';
import type { OnProgress } from '../common/progress.js';
import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from '../network/types.js';

export interface LoadedFeed {
  feed: Feed;
  patterns: PatternSet;
  date: string | null; // the analysis date of the patterns; null when no weekday has service
}

/**
 * Reads every trip of a feed and builds its patterns on date (default: the busiest weekday). A feed with no
 * trips on that date still loads, with no patterns, so that check can report it.
 */
export async function loadFeed(source: string, options: { date?: string; onProgress?: OnProgress } = {}): Promise<LoadedFeed> {
  const { date: asked, onProgress } = options;
  if (asked !== undefined && !/^\d{4}-\d{2}-\d{2}$/.test(asked)) {
    throw new StopspanError('bad-option', `invalid option --date: expected YYYY-MM-DD, got ${asked}`, { value: asked });
  }
  // loaded here, not with the module: the commands that import this one register at every start-up
  const [{ readFeed }, { buildPatterns }, { busiestWeekday }] = await Promise.all([import('../gtfs/readFeed.js'), import('../network/buildPatterns.js'), import('../audit/check.js')]);
  const feed = await readFeed(source, { date: 'all', onProgress });
  const date = asked ?? busiestWeekday(feed);
  const empty: PatternSet = { date: date ?? '', patterns: [], routesAtStop: new Map() };
  if (date === null) return { feed, patterns: empty, date };
  try {
    return { feed, patterns: buildPatterns(feed, { date, onProgress }), date };
  } catch (e) {
    if (isStopspanError(e) && e.code === 'empty-feed') return { feed, patterns: empty, date };
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

/** Writes files into dir (created when missing), each through a temporary name and a rename. */
export async function writeFiles(dir: string, files: Record<string, string>): Promise<string[]> {
  try {
    await mkdir(dir, { recursive: true });
    const written: string[] = [];
    for (const [name, text] of Object.entries(files)) {
      const path = join(dir, name);
      const tmp = `${path}.tmp-${process.pid}`;
      await writeFile(tmp, text);
      await rename(tmp, path);
      written.push(path);
    }
    return written;
  } catch (e) {
    throw new StopspanError('bad-option', `cannot write the output folder: ${(e as Error).message}`, { file: dir });
  }
}
