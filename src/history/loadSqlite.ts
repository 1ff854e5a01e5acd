// Loads the SQLite binding (better-sqlite3 12, an optional dependency) the first time a history is opened
// (or a GeoPackage written), so that every other command, and the library, runs without it; when it is not
// installed, opening a history is a one-line 'history-db' error saying how to install it (the GeoPackage
// names its own need and code).

import type Database from 'better-sqlite3';
import { StopspanError, type ErrorCode } from '../common/errors.js';
import { requireCjs } from '../common/requireCjs.js';

export type SqliteBinding = typeof Database;

let binding: SqliteBinding | undefined;

/** Who needs the binding: the words that start the message when it is missing, and the error's code. */
export interface SqliteNeed {
  what: string;
  code: ErrorCode;
}

const HISTORY_NEED: SqliteNeed = { what: 'the run history', code: 'history-db' };

/** The better-sqlite3 constructor; throws need.code (default 'history-db') naming the package when it cannot be loaded. */
export function loadSqlite(file?: string, need: SqliteNeed = HISTORY_NEED): SqliteBinding {
  if (binding) return binding;
  try {
    binding = requireCjs('better-sqlite3') as SqliteBinding;
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code !== 'MODULE_NOT_FOUND' && code !== 'ERR_DLOPEN_FAILED') throw e;
    throw new StopspanError(
      need.code,
      `${need.what} needs the optional package better-sqlite3 (version 12), which is not installed here: run npm install better-sqlite3@12`,
      { file },
    );
  }
  return binding;
}
