// Reads a stop-level ridership file (boardings and alightings per day, optionally per route and
// direction: the usual shape of automatic passenger counter exports) into checked rows.
// Strict where numbers would otherwise be wrong: a missing column, a count that is not a number of 0 or
// more, or a duplicated row (same stop, route and direction, or a stop given both with and without a
// route) is an error naming file, line, column and value. Rows naming stops or routes the feed does not
// have are skipped and counted as warnings (counter exports often cover more than one feed).

import { parseDecimal } from '../common/decimal.js';
import { readFileSync } from 'node:fs';
import { StopspanError } from '../common/errors.js';
import type { WarningSink } from '../common/warnings.js';
import type { Feed } from '../gtfs/types.js';
import { parseCsv } from '../gtfs/csv.js';

export interface RidershipRow {
  stopIdx: number; // index into Feed.stops
  stopId: string;
  routeId: string | null; // null: all routes at the stop
  directionId: number | null; // null: both directions
  boardingsPerDay: number;
  alightingsPerDay: number;
  line: number;
}

export interface Ridership {
  file: string;
  rows: RidershipRow[];
}

const REQUIRED = ['stop_id', 'boardings', 'alightings'] as const;

function count(text: string, file: string, line: number, column: string): number {
  const n = parseDecimal(text);
  if (n === null || n < 0) {
    throw new StopspanError('bad-ridership', `invalid ${column}: expected a number of 0 or more per day`, { file, line, column, value: text });
  }
  return n;
}

/** Parses ridership CSV text against a feed. */
export function parseRidership(text: string, feed: Feed, { file, warnings }: { file: string; warnings: WarningSink }): Ridership {
  const csv = parseCsv(text, { file, warnings });
  const col = new Map(csv.header.map((h, i) => [h.trim().toLowerCase(), i]));
  for (const name of REQUIRED) {
    if (!col.has(name)) {
      throw new StopspanError('bad-ridership', `ridership file lacks the required column ${name} (needs ${REQUIRED.join(', ')}; route_id and direction_id optional)`, { file, line: 1, column: name });
    }
  }
  if (csv.rows.length === 0) throw new StopspanError('bad-ridership', 'ridership file has no data rows', { file, line: 2 });
  const iStop = col.get('stop_id')!;
  const iB = col.get('boardings')!;
  const iA = col.get('alightings')!;
  const iRoute = col.get('route_id');
  const iDir = col.get('direction_id');
  const seen = new Map<string, number>(); // key -> line
  const stopScope = new Map<string, 'all' | 'route'>();
  const rows: RidershipRow[] = [];
  for (let r = 0; r < csv.rows.length; r++) {
    const f = csv.rows[r];
    const line = csv.lines[r];
    const stopId = f[iStop].trim();
    if (stopId === '') throw new StopspanError('bad-ridership', 'blank stop_id', { file, line, column: 'stop_id', value: f[iStop] });
    const boardingsPerDay = count(f[iB], file, line, 'boardings');
    const alightingsPerDay = count(f[iA], file, line, 'alightings');
    const routeRaw = iRoute === undefined ? '' : f[iRoute].trim();
    const dirRaw = iDir === undefined ? '' : f[iDir].trim();
    let directionId: number | null = null;
    if (dirRaw !== '') {
      if (dirRaw !== '0' && dirRaw !== '1') throw new StopspanError('bad-ridership', 'invalid direction_id: expected 0, 1 or blank', { file, line, column: 'direction_id', value: dirRaw });
      directionId = Number(dirRaw);
    }
    const routeId = routeRaw === '' ? null : routeRaw;
    const key = `${stopId}\u0000${routeId ?? ''}\u0000${directionId ?? ''}`;
    const dupLine = seen.get(key);
    if (dupLine !== undefined) {
      throw new StopspanError('bad-ridership', `duplicate ridership row for stop ${stopId}${routeId ? ` route ${routeId}` : ''}${directionId !== null ? ` direction ${directionId}` : ''} (first on line ${dupLine}); combine the rows`, { file, line, column: 'stop_id', value: stopId });
    }
    seen.set(key, line);
    const scope = routeId === null && directionId === null ? 'all' : 'route';
    const prior = stopScope.get(stopId);
    if (prior !== undefined && prior !== scope) {
      throw new StopspanError('bad-ridership', `stop ${stopId} is given both for all routes and per route; the counts would be double`, { file, line, column: 'route_id', value: routeRaw });
    }
    stopScope.set(stopId, scope);
    const stopIdx = feed.stopIndex.get(stopId);
    if (stopIdx === undefined) {
      warnings.add('ridership-unknown-stop', 'ridership rows naming a stop_id the feed does not have were skipped', `${file}:${line} ${stopId}`);
      continue;
    }
    if (routeId !== null && !feed.routes.has(routeId)) {
      warnings.add('ridership-unknown-route', 'ridership rows naming a route_id the feed does not have were skipped', `${file}:${line} ${routeId}`);
      continue;
    }
    rows.push({ stopIdx, stopId, routeId, directionId, boardingsPerDay, alightingsPerDay, line });
  }
  return { file, rows };
}

/** Reads and parses a ridership file. */
export function loadRidership(path: string, feed: Feed, { warnings }: { warnings: WarningSink }): Ridership {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new StopspanError('bad-ridership', `cannot read ridership file: ${(e as Error).message}`, { file: path });
  }
  return parseRidership(text, feed, { file: path, warnings });
}
