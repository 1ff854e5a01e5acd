// Reads a stop-level ridership file (boardings and alightings per day, optionally per route and
// direction: the usual shape of automatic passenger counter exports) into checked rows.
// Strict where numbers would otherwise be wrong: a missing column, a count that is not a number of 0 or
// more, or a duplicated row (same stop, route and direction, or a stop given both with and without a
// route) is an error naming file, line, column and value. Rows naming stops or routes the feed does not
// have are skipped and counted as warnings (counter exports often cover more than one feed), before the
// duplicate checks, so only the rows kept are remembered. The file is read in pieces, never whole, and
// refused past MAX_RIDERSHIP_ROWS data rows.

import { readInPieces } from '../common/readInPieces.js';
import { parseDecimal } from '../common/decimal.js';
import { StopspanError } from '../common/errors.js';
import type { WarningSink } from '../common/warnings.js';
import type { Feed } from '../gtfs/types.js';
import { CsvTableParser, reportCsvStats } from '../gtfs/csv.js';
import type { CsvRow } from '../gtfs/csvCore.js';

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

/**
 * Most data rows a ridership file may have: 1 000 000. One row per stop, route and direction of a whole
 * city's bus network is a few tens of thousands (New York's buses: about 16 000 stops); several feeds'
 * worth stays well under this, and past it the file is refused before it fills memory.
 */
export const MAX_RIDERSHIP_ROWS = 1_000_000;

function count(text: string, file: string, line: number, column: string): number {
  const n = parseDecimal(text);
  if (n === null || n < 0) {
    throw new StopspanError('bad-ridership', `invalid ${column}: expected a number of 0 or more per day`, {
      file,
      line,
      column,
      value: text,
    });
  }
  return n;
}

/** Reads ridership rows as they are parsed: checks each, keeps the usable ones. */
class RidershipReader {
  readonly rows: RidershipRow[] = [];
  readonly parser: CsvTableParser;
  private records = 0;
  private iStop = 0;
  private iB = 0;
  private iA = 0;
  private iRoute: number | undefined;
  private iDir: number | undefined;
  private readonly seen = new Map<string, number>(); // key -> line
  private readonly stopScope = new Map<string, 'all' | 'route'>();

  constructor(
    private readonly feed: Feed,
    private readonly file: string,
    private readonly warnings: WarningSink,
  ) {
    this.parser = new CsvTableParser(file, (row) => this.row(row), { onHeader: (h) => this.header(h) });
  }

  private header(header: string[]): void {
    const file = this.file;
    const col = new Map(header.map((h, i) => [h.trim().toLowerCase(), i]));
    for (const name of REQUIRED) {
      if (!col.has(name)) {
        throw new StopspanError(
          'bad-ridership',
          `ridership file lacks the required column ${name} (needs ${REQUIRED.join(', ')}; route_id and direction_id optional)`,
          { file, line: 1, column: name },
        );
      }
    }
    this.iStop = col.get('stop_id')!;
    this.iB = col.get('boardings')!;
    this.iA = col.get('alightings')!;
    this.iRoute = col.get('route_id');
    this.iDir = col.get('direction_id');
  }

  private row(f: CsvRow): void {
    const { file, feed, warnings } = this;
    const line = f.line;
    if (++this.records > MAX_RIDERSHIP_ROWS) {
      throw new StopspanError('feed-too-large', `ridership file has more than ${MAX_RIDERSHIP_ROWS} data rows, the cap`, { file, line });
    }
    const stopId = f.get(this.iStop).trim();
    if (stopId === '')
      throw new StopspanError('bad-ridership', 'blank stop_id', { file, line, column: 'stop_id', value: f.get(this.iStop) });
    const boardingsPerDay = count(f.get(this.iB), file, line, 'boardings');
    const alightingsPerDay = count(f.get(this.iA), file, line, 'alightings');
    const routeRaw = this.iRoute === undefined ? '' : f.get(this.iRoute).trim();
    const dirRaw = this.iDir === undefined ? '' : f.get(this.iDir).trim();
    let directionId: number | null = null;
    if (dirRaw !== '') {
      if (dirRaw !== '0' && dirRaw !== '1')
        throw new StopspanError('bad-ridership', 'invalid direction_id: expected 0, 1 or blank', {
          file,
          line,
          column: 'direction_id',
          value: dirRaw,
        });
      directionId = Number(dirRaw);
    }
    const routeId = routeRaw === '' ? null : routeRaw;
    const stopIdx = feed.stopIndex.get(stopId);
    if (stopIdx === undefined) {
      warnings.add('ridership-unknown-stop', `${file}:${line} ${stopId}`);
      return;
    }
    if (routeId !== null && !feed.routes.has(routeId)) {
      warnings.add('ridership-unknown-route', `${file}:${line} ${routeId}`);
      return;
    }
    const key = `${stopId}\u0000${routeId ?? ''}\u0000${directionId ?? ''}`;
    const dupLine = this.seen.get(key);
    if (dupLine !== undefined) {
      throw new StopspanError(
        'bad-ridership',
        `duplicate ridership row for stop ${stopId}${routeId ? ` route ${routeId}` : ''}${directionId !== null ? ` direction ${directionId}` : ''} (first on line ${dupLine}); combine the rows`,
        { file, line, column: 'stop_id', value: stopId },
      );
    }
    this.seen.set(key, line);
    const scope = routeId === null && directionId === null ? 'all' : 'route';
    const prior = this.stopScope.get(stopId);
    if (prior !== undefined && prior !== scope) {
      throw new StopspanError('bad-ridership', `stop ${stopId} is given both for all routes and per route; the counts would be double`, {
        file,
        line,
        column: 'route_id',
        value: routeRaw,
      });
    }
    this.stopScope.set(stopId, scope);
    this.rows.push({ stopIdx, stopId, routeId, directionId, boardingsPerDay, alightingsPerDay, line });
  }

  finish(): Ridership {
    const stats = this.parser.end();
    if (this.parser.columns === null) this.header([]);
    reportCsvStats(this.warnings, this.file, this.parser.columns ?? [], stats);
    if (this.records === 0) throw new StopspanError('bad-ridership', 'ridership file has no data rows', { file: this.file, line: 2 });
    return { file: this.file, rows: this.rows };
  }
}

/** Parses ridership CSV text against a feed. */
export function parseRidership(text: string, feed: Feed, { file, warnings }: { file: string; warnings: WarningSink }): Ridership {
  const r = new RidershipReader(feed, file, warnings);
  r.parser.push(text);
  return r.finish();
}

/** Reads and parses a ridership file, 1 MiB at a time. */
export function loadRidership(path: string, feed: Feed, { warnings }: { warnings: WarningSink }): Ridership {
  const r = new RidershipReader(feed, path, warnings);
  readInPieces(path, (piece) => r.parser.push(piece), 'bad-ridership', 'ridership file');
  return r.finish();
}
