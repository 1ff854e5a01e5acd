// One error class for every known failure, with a closed set of codes and where it happened.
// The CLI turns it into one line and exit code 2; anything else is a bug (exit 3).

import { terminalText } from './terminalText.js';

export type ErrorCode =
  | 'feed-unreadable' // the archive or folder cannot be opened (corrupt zip, not a zip, no such path)
  | 'feed-too-large' // a zip entry or the whole archive exceeds the inflation caps
  | 'download-failed' // a URL could not be fetched (status, timeout, redirect loop, too large, not a zip)
  | 'missing-table' // a required GTFS table is absent
  | 'missing-column' // a required column is absent from a table
  | 'bad-value' // a value cannot be parsed (time, number, date, enum)
  | 'bad-reference' // an id points nowhere (unknown stop_id in stop_times, unknown route in trips)
  | 'csv-syntax' // malformed CSV (unterminated quote, line too long, NUL bytes, bad encoding)
  | 'empty-feed' // nothing to analyse (no trips on the date, no patterns)
  | 'bad-option' // an option or parameter is invalid
  | 'bad-ridership' // a ridership file is malformed
  | 'bad-land-use' // a land-use file is malformed (coordinates, columns, counts, geometry, or far from every stop)
  | 'bad-scenario' // a what-if scenario is malformed or names unknown items
  | 'bad-realtime' // a realtime archive cannot be used at all
  | 'output-exists' // the output folder exists and --force was not given
  | 'bad-output' // the output folder cannot be written there, or is not a previous output this tool may replace
  | 'history-db'; // the history database cannot be opened or written

export interface ErrorContext {
  file?: string;
  line?: number;
  column?: string;
  value?: string;
  /** Lines listed under the error line: the items that match, or the names nearest to the one asked for. */
  choices?: string[];
}

export class StopspanError extends Error {
  readonly code: ErrorCode;
  readonly context: ErrorContext;
  constructor(code: ErrorCode, message: string, context: ErrorContext = {}) {
    super(message);
    this.name = 'StopspanError';
    this.code = code;
    this.context = context;
  }

  /** One line for people: "file:line column: message (got value)". Values are clipped; unseen characters shown escaped (terminalText). */
  oneLine(): string {
    const { file, line, column, value } = this.context;
    let where = '';
    if (file) where += file;
    if (line !== undefined) where += `${where ? ':' : 'line '}${line}`;
    if (column) where += `${where ? ' ' : ''}column ${column}`;
    // the value once: a message that already quotes it (or ends "got <value>") is not followed by it again
    const quoted = value !== undefined && (this.message.includes(JSON.stringify(value)) || this.message.includes(`got ${value}`));
    const got = value !== undefined && !quoted ? ` (got ${JSON.stringify(clip(value, 60))})` : '';
    return terminalText(`${where ? where + ': ' : ''}${this.message.replace(/[\r\n]+/g, ' ')}${got}`);
  }
}

function clip(s: string, n: number): string {
  return s.length > n ? s.slice(0, n) + '…' : s;
}

export function isStopspanError(e: unknown): e is StopspanError {
  return e instanceof StopspanError;
}
