// Opens (and on first use creates) the SQLite history of nightly runs: a versioned schema applied by an
// ordered list of migrations, WAL journal and a busy timeout so two jobs can write at once. A database that
// is not this tool's is refused before anything in it changes; a reading command opens it read-only.

import type Database from 'better-sqlite3';
import { StopspanError } from '../common/errors.js';
import { loadSqlite } from './loadSqlite.js';

export type HistoryDb = Database.Database;

/** Migration k (0-based) brings the schema from version k to k + 1. Never edit one that has shipped; append. */
export const MIGRATIONS: string[] = [
  `CREATE TABLE runs (
     id INTEGER PRIMARY KEY AUTOINCREMENT,
     recorded_at TEXT NOT NULL,
     run_date TEXT NOT NULL,
     command TEXT NOT NULL,
     feed_source TEXT NOT NULL,
     feed_version TEXT NOT NULL,
     content_hash TEXT NOT NULL,
     publisher TEXT NOT NULL,
     analysis_date TEXT,
     patterns INTEGER,
     stops INTEGER,
     trips INTEGER,
     median_gap_m REAL,
     mean_optimal_spacing_m REAL,
     close_stops INTEGER,
     wide_gaps INTEGER,
     pax_min_lost_per_day REAL,
     errors INTEGER NOT NULL DEFAULT 0,
     warnings INTEGER NOT NULL DEFAULT 0,
     infos INTEGER NOT NULL DEFAULT 0
   );
   CREATE INDEX runs_by_date ON runs (run_date, id);
   CREATE TABLE run_findings (
     run_id INTEGER NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
     code TEXT NOT NULL,
     count INTEGER NOT NULL,
     PRIMARY KEY (run_id, code)
   );`,
];

export const SCHEMA_VERSION = MIGRATIONS.length;

export interface OpenHistoryOptions {
  busyTimeoutMs?: number; // how long a writer waits for another's lock, default 10 000 ms
  readOnly?: boolean; // only to read: the file must exist and hold a history; nothing in it changes
}

/** The schema marker: SQLite's application_id header field, set in every history this tool creates or opens to write. */
export const HISTORY_APPLICATION_ID = 0x53545350; // "STSP"

/** The tables a history holds; a database without the marker is taken as this tool's only if it holds all of them. */
const HISTORY_TABLES = ['schema_version', 'runs', 'run_findings'];

/**
 * Opens the database at path, creating the file and the schema when needed (read-only with readOnly: then
 * the file must exist). Throws history-db on failure, and for a database that is not a history of this tool
 * (another program's tables, without the schema marker), before changing anything in it.
 */
export function openHistory(path: string, options: OpenHistoryOptions = {}): HistoryDb {
  const { busyTimeoutMs = 10_000, readOnly = false } = options;
  if (typeof path !== 'string' || path === '') {
    throw new StopspanError('bad-option', `invalid option history: expected a file path, got ${JSON.stringify(path)}`, {
      value: String(path),
    });
  }
  if (!Number.isInteger(busyTimeoutMs) || busyTimeoutMs < 0) {
    throw new StopspanError('bad-option', `invalid option busyTimeoutMs: expected an integer >= 0, got ${busyTimeoutMs}`, {
      value: String(busyTimeoutMs),
    });
  }
  const Sqlite = loadSqlite(path);
  let db: HistoryDb;
  try {
    db = new Sqlite(path, readOnly ? { readonly: true, fileMustExist: true } : {});
  } catch (e) {
    throw new StopspanError('history-db', `cannot open the history database: ${(e as Error).message}`, { file: path });
  }
  try {
    db.pragma(`busy_timeout = ${busyTimeoutMs}`);
    const empty = whileBusy(() => checkIsHistory(db, path), busyTimeoutMs);
    if (readOnly) {
      if (empty) throw new StopspanError('history-db', 'the history database is empty: no run has been recorded in it', { file: path });
      checkVersion(db, path, true);
      return db;
    }
    whileBusy(() => db.pragma('journal_mode = WAL'), busyTimeoutMs);
    db.pragma('foreign_keys = ON');
    whileBusy(() => migrate(db, path), busyTimeoutMs);
  } catch (e) {
    db.close();
    if (e instanceof StopspanError) throw e;
    throw new StopspanError('history-db', `cannot prepare the history database: ${(e as Error).message}`, { file: path });
  }
  return db;
}

/**
 * Runs f again while SQLite says the database is busy, for up to timeoutMs. Switching a new file to WAL, or
 * starting its first transaction, can fail busy at once, without the busy timeout's wait, while another
 * process does the same (seen as "database is locked" from two nightly jobs starting together).
 */
function whileBusy<T>(f: () => T, timeoutMs: number): T {
  const deadline = Date.now() + timeoutMs;
  for (let waitMs = 5; ; waitMs = Math.min(2 * waitMs, 200)) {
    try {
      return f();
    } catch (e) {
      const code = (e as { code?: unknown }).code;
      if ((code !== 'SQLITE_BUSY' && code !== 'SQLITE_LOCKED') || Date.now() >= deadline) throw e;
      Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, waitMs); // a synchronous pause
    }
  }
}

/**
 * Throws history-db unless the database is empty or a history of this tool: marked with
 * HISTORY_APPLICATION_ID, or (histories written before the marker) holding every history table. Returns
 * whether it is empty. Reads only.
 */
function checkIsHistory(db: HistoryDb, path: string): boolean {
  const appId = Number(db.pragma('application_id', { simple: true }));
  const names = (db.prepare("SELECT name FROM sqlite_master WHERE name NOT LIKE 'sqlite_%'").all() as { name: string }[]).map(
    (r) => r.name,
  );
  if (appId === HISTORY_APPLICATION_ID) return false;
  if (appId === 0 && names.length === 0) return true;
  if (appId === 0 && HISTORY_TABLES.every((t) => names.includes(t))) return false;
  const what =
    appId !== 0
      ? `another program's (application id ${appId})`
      : `another program's (it holds ${names.slice(0, 3).join(', ')}${names.length > 3 ? ', …' : ''})`;
  throw new StopspanError('history-db', `not a stopspan history database: it is ${what}; give a new file or one stopspan wrote`, {
    file: path,
  });
}

/** Throws history-db when the schema is newer than this stopspan's, or (to read only) older: that needs a write to migrate. */
function checkVersion(db: HistoryDb, path: string, readOnly: boolean): number {
  const row = db.prepare('SELECT version FROM schema_version').get() as { version: number } | undefined;
  const current = row?.version ?? 0;
  if (current > SCHEMA_VERSION) {
    throw new StopspanError(
      'history-db',
      `the history database has schema version ${current}, newer than this stopspan knows (${SCHEMA_VERSION}); upgrade stopspan`,
      { file: path, value: String(current) },
    );
  }
  if (readOnly && current < SCHEMA_VERSION) {
    throw new StopspanError(
      'history-db',
      `the history database has schema version ${current}, older than this stopspan's (${SCHEMA_VERSION}); record a run in it to upgrade it`,
      {
        file: path,
        value: String(current),
      },
    );
  }
  return current;
}

function migrate(db: HistoryDb, path: string): void {
  // IMMEDIATE: two processes creating the same new file take turns instead of both migrating
  db.transaction(() => {
    db.exec('CREATE TABLE IF NOT EXISTS schema_version (version INTEGER NOT NULL)');
    const row = db.prepare('SELECT version FROM schema_version').get() as { version: number } | undefined;
    const current = checkVersion(db, path, false);
    for (let v = current; v < SCHEMA_VERSION; v++) db.exec(MIGRATIONS[v]);
    if (!row) db.prepare('INSERT INTO schema_version (version) VALUES (?)').run(SCHEMA_VERSION);
    else if (current !== SCHEMA_VERSION) db.prepare('UPDATE schema_version SET version = ?').run(SCHEMA_VERSION);
    if (Number(db.pragma('application_id', { simple: true })) !== HISTORY_APPLICATION_ID)
      db.pragma(`application_id = ${HISTORY_APPLICATION_ID}`);
  }).immediate();
}
