// The one CSV reader for every table, its adapters: bytes (a stream, or a whole text) decoded and fed in
// pieces to the state machine in csvCore.ts, so a
// whole table never sits in memory and the reader keeps up with inflating. A record is handed over as
// field offsets into the current text (CsvRow); strings are cut only for the fields a caller asks for,
// and numbers and times can be read straight from the characters. Strict where the data would otherwise
// be wrong (unterminated quote, NUL, over-long record, duplicate header), lenient and counted where it
// can safely go on (padded values trimmed, invalid UTF-8 replaced, rows with too few or too many fields).

import { isAscii, isUtf8 } from 'node:buffer';
import { Readable } from 'node:stream';
import { StopspanError } from '../common/errors.js';
import type { WarningSink } from '../common/warnings.js';
import { CsvCore, DEFAULT_MAX_RECORD_CHARS, UTF16_MESSAGE, type CsvRow, type CsvStats } from './csvCore.js';

/** Bytes decoded and parsed at a time. */
const PIECE_BYTES = 64 * 1024;

/** Whether bytes start with a UTF-16 byte-order mark (FF FE little-endian, FE FF big-endian). */
function hasUtf16Bom(b: Buffer): boolean {
  return b.length >= 2 && ((b[0] === 0xff && b[1] === 0xfe) || (b[0] === 0xfe && b[1] === 0xff));
}

function checkHeader(header: string[], file: string): void {
  const seen = new Set<string>();
  for (const h of header) {
    if (h === '') continue; // unnamed columns (trailing commas) are ignored, however many
    if (seen.has(h)) throw new StopspanError('csv-syntax', 'duplicate column name in the header', { file, line: 1, column: h, value: h });
    seen.add(h);
  }
}

export interface ParsedCsv {
  header: string[];
  rows: string[][]; // each exactly header.length long
  lines: number[]; // physical line where each row starts (1-based)
}

/** Parses a whole CSV text at once (small files such as ridership tables), by the same code as readCsv. */
export function parseCsv(
  text: string,
  { file, warnings, maxRecordChars = DEFAULT_MAX_RECORD_CHARS }: { file: string; warnings?: WarningSink; maxRecordChars?: number },
): ParsedCsv {
  const rows: string[][] = [];
  const lines: number[] = [];
  let width = 0;
  const parser = new CsvTableParser(
    file,
    (row) => {
      const out = new Array<string>(width);
      for (let k = 0; k < width; k++) out[k] = row.get(k);
      rows.push(out);
      lines.push(row.line);
    },
    { maxRecordChars, onHeader: (h) => (width = h.length) },
  );
  parser.push(text);
  const stats = parser.end();
  const header = parser.columns ?? [];
  if (warnings) reportCsvStats(warnings, file, header, stats);
  return { header, rows, lines };
}

function emptyStats(): CsvStats {
  return { records: 0, paddedValues: 0, shortRows: 0, longRows: 0, invalidUtf8: 0, bytes: 0 };
}

function countWidth(row: CsvRow, width: number, stats: CsvStats): void {
  if (row.count < width) stats.shortRows++;
  else if (row.count > width) stats.longRows++;
}

/** Turns a table's counts into warnings: padded values, stray quotes, ragged rows, invalid UTF-8. */
export function reportCsvStats(warnings: WarningSink, file: string, header: string[], stats: CsvTableStats): void {
  const replacedAt = stats.replacedAt;
  if (stats.paddedValues > 0) {
    const ex = stats.paddedExamples.map((p) => `${file}:${p.line} column ${header[p.field] ?? p.field + 1}`);
    warnings.add('padded-values', ex[0], stats.paddedValues);
    for (const e of ex.slice(1)) warnings.add('padded-values', e, 0); // keep examples, count once
  }
  if (stats.strayQuotes > 0) {
    const ex = stats.strayExamples.map((p) => `${file}:${p.line} column ${header[p.field] ?? p.field + 1}`);
    warnings.add('stray-quotes', ex[0], stats.strayQuotes);
    for (const e of ex.slice(1)) warnings.add('stray-quotes', e, 0);
  }
  if (stats.shortRows > 0) warnings.add('short-rows', file, stats.shortRows);
  if (stats.longRows > 0) warnings.add('long-rows', file, stats.longRows);
  if (stats.invalidUtf8 > 0) {
    warnings.add('invalid-utf8', replacedAt[0] ?? file, stats.invalidUtf8);
    for (const e of replacedAt.slice(1)) warnings.add('invalid-utf8', e, 0);
  }
}

export interface ReadCsvOptions {
  file: string;
  /** Called once with the header (trimmed, BOM removed; [] for an empty table). Throw here to reject missing columns. */
  onHeader: (header: string[]) => void;
  /** Called per data record; the row is reused and valid only during the call; row.line is its first physical line. */
  onRow: (row: CsvRow) => void;
  warnings?: WarningSink;
  maxRecordChars?: number;
  /** Called every few MiB with the bytes read so far, and once at the end. */
  onBytes?: (bytes: number) => void;
  /** Skip whole groups of rows by the value of one column (see CsvGroupKey). */
  groupKey?: CsvGroupKey;
}

/**
 * Rows come grouped by one column (stop_times.txt by trip_id, for instance) and only some groups are
 * wanted: keep(value) is asked once per run of equal values, and the rows of a run it refuses are not
 * handed on. When the key is the first column, those rows are not even split into fields, so their
 * fields are not checked and rows with too few or too many fields among them are not counted.
 */
export interface CsvGroupKey {
  column: string;
  keep: (value: string) => boolean;
}

/** What the parser found, for the warnings once the whole table is read. */
export interface CsvTableStats extends CsvStats {
  paddedExamples: Array<{ line: number; field: number }>;
  strayQuotes: number;
  strayExamples: Array<{ line: number; field: number }>;
  replacedAt: string[]; // where invalid UTF-8 was replaced, "file:line column c"
}

/**
 * Parses a CSV table pushed in pieces, its first record the header. Bytes may be cut anywhere, inside a
 * UTF-8 sequence too; strings may be pushed as already decoded text. Under both readCsv and parseCsv.
 */
export class CsvTableParser {
  readonly stats: CsvTableStats = { ...emptyStats(), paddedExamples: [], strayQuotes: 0, strayExamples: [], replacedAt: [] };
  private readonly core: CsvCore;
  private carry: Buffer | null = null;
  private checkReplaced = false;
  private width = 0;
  private header: string[] | null = null;

  constructor(
    private readonly file: string,
    onRow: (row: CsvRow) => void,
    {
      maxRecordChars = DEFAULT_MAX_RECORD_CHARS,
      onHeader,
      groupKey,
    }: { maxRecordChars?: number; onHeader?: (header: string[]) => void; groupKey?: CsvGroupKey } = {},
  ) {
    const stats = this.stats;
    let keyColumn = -1; // the group key's column, once the header is known (-1: no key)
    let lastKey = '\0';
    let keepGroup = true;
    this.core = new CsvCore(
      file,
      (row) => {
        if (this.header === null) {
          const h = row.toArray();
          checkHeader(h, file);
          this.header = h;
          this.core.names = h;
          this.width = h.length;
          onHeader?.(h);
          if (groupKey) keyColumn = h.indexOf(groupKey.column);
          return;
        }
        stats.records++;
        if (row.count !== this.width) countWidth(row, this.width, stats);
        if (this.checkReplaced) this.noteReplaced(row);
        if (keyColumn >= 0) {
          if (!row.equals(keyColumn, lastKey)) {
            lastKey = row.get(keyColumn);
            keepGroup = (groupKey as CsvGroupKey).keep(lastKey);
            // the next records of a skipped group are passed over unsplit while they start with its key
            // (key in the first column only: the prefix test cannot find a later field)
            this.core.skipKey = !keepGroup && keyColumn === 0 && lastKey !== '' ? lastKey : null;
          }
          if (!keepGroup) return;
        }
        onRow(row);
      },
      maxRecordChars,
    );
  }

  /** The header, once read (null until then). */
  get columns(): string[] | null {
    return this.header;
  }

  push(chunk: Buffer | Uint8Array | string): void {
    if (typeof chunk === 'string') {
      this.core.push(chunk);
      return;
    }
    const all = Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength);
    // parsed in pieces of at most 64 KiB: a longer decoded string would sit in V8's large-object space,
    // which only a full collection frees, so memory would grow with the table's size (measured: peak
    // memory of the demo enlarged 16 times, 148 MB with 1 MiB strings, see README)
    for (let at = 0; at < all.length; at += PIECE_BYTES) this.pushPiece(all.subarray(at, Math.min(all.length, at + PIECE_BYTES)));
  }

  private pushPiece(piece: Buffer): void {
    let bytes = piece;
    if (this.stats.bytes === 0 && hasUtf16Bom(bytes)) throw new StopspanError('csv-syntax', UTF16_MESSAGE, { file: this.file, line: 1 });
    this.stats.bytes += bytes.length;
    if (this.carry) {
      bytes = Buffer.concat([this.carry, bytes]);
      this.carry = null;
    }
    const cut = completeUtf8Length(bytes);
    if (cut < bytes.length) {
      this.carry = Buffer.from(bytes.subarray(cut));
      bytes = bytes.subarray(0, cut);
    }
    this.pushBytes(bytes);
  }

  /** Parses what is left; returns the counts (warnings are the caller's, see reportCsvStats). */
  end(): CsvTableStats {
    if (this.carry) this.pushBytes(this.carry);
    this.carry = null;
    this.checkReplaced = this.stats.invalidUtf8 > 0;
    this.core.end();
    const st = this.stats;
    st.records += this.core.skipped;
    this.core.skipped = 0;
    st.paddedValues = this.core.paddedValues;
    st.paddedExamples = this.core.paddedExamples.slice();
    st.strayQuotes = this.core.strayQuotes;
    st.strayExamples = this.core.strayExamples.slice();
    return st;
  }

  private pushBytes(b: Buffer): void {
    const before = this.stats.invalidUtf8;
    const text = decode(b, this.stats);
    this.checkReplaced = this.stats.invalidUtf8 > before;
    this.core.push(text);
    this.checkReplaced = false;
  }

  // after a chunk with invalid UTF-8, look for the replacement characters to name where they are
  private noteReplaced(row: CsvRow): void {
    const at = this.stats.replacedAt;
    for (let k = 0; k < row.count && at.length < 5; k++) {
      if (row.get(k).includes('\ufffd')) at.push(`${this.file}:${row.line} column ${this.header?.[k] ?? k + 1}`);
    }
  }
}

/** Streams a CSV table from bytes (a Readable or any async iterable of Buffers or strings). */
export async function readCsv(
  stream: AsyncIterable<Buffer | Uint8Array | string> | Iterable<Buffer | Uint8Array | string>,
  { file, onHeader, onRow, warnings, maxRecordChars = DEFAULT_MAX_RECORD_CHARS, onBytes, groupKey }: ReadCsvOptions,
): Promise<CsvStats> {
  const parser = new CsvTableParser(file, onRow, { maxRecordChars, onHeader, groupKey });
  let sinceReport = 0;
  const take = (chunk: Buffer | Uint8Array | string): void => {
    parser.push(chunk);
    if (typeof chunk !== 'string') sinceReport += chunk.length;
    if (onBytes && sinceReport >= 4 << 20) {
      sinceReport = 0;
      onBytes(parser.stats.bytes);
    }
  };
  if (stream instanceof Readable) await eachChunk(stream, take);
  else for await (const chunk of stream) take(chunk);
  const stats = parser.end();
  if (onBytes) onBytes(stats.bytes);
  const header = parser.columns;
  if (header === null) onHeader([]);
  if (warnings) reportCsvStats(warnings, file, header ?? [], stats);
  return {
    records: stats.records,
    paddedValues: stats.paddedValues,
    shortRows: stats.shortRows,
    longRows: stats.longRows,
    invalidUtf8: stats.invalidUtf8,
    bytes: stats.bytes,
  };
}

/**
 * Hands a stream's chunks to `take` one by one, as they were pushed, in flowing mode. A Readable's async
 * iterator would read() all that is buffered at once, joined into one Buffer: behind a deep read-ahead
 * (stop_times.txt, 32 MiB) that copy cost the main thread 15-20 ms, and the memory twice over.
 * Resolves at the end; rejects with what `take` throws (the stream is then destroyed) or the stream's error.
 */
function eachChunk(stream: Readable, take: (chunk: Buffer | string) => void): Promise<void> {
  return new Promise<void>((resolve, reject) => {
    let settled = false;
    const finish = (err?: unknown): void => {
      if (settled) return;
      settled = true;
      stream.off('data', onData);
      stream.off('end', onEnd);
      stream.off('error', finish);
      stream.off('close', onClose);
      if (err === undefined) resolve();
      else reject(err);
    };
    const resume = (): void => {
      if (!settled) stream.resume();
    };
    const onData = (chunk: Buffer | string): void => {
      try {
        take(chunk);
      } catch (e) {
        finish(e);
        stream.destroy();
        return;
      }
      // more is buffered: let the event loop turn before the next chunk, so that inflating (whose thread
      // pool work is handed on by callbacks on this thread) goes on while this thread parses
      if (stream.readableLength > 0) {
        stream.pause();
        setImmediate(resume);
      }
    };
    const onEnd = (): void => finish();
    // destroyed without an error and before its end: as the async iterator does, a premature close fails
    const onClose = (): void => finish(Object.assign(new Error('Premature close'), { code: 'ERR_STREAM_PREMATURE_CLOSE' }));
    // a stream that failed or ended before this reader came to it
    if (stream.errored) return finish(stream.errored);
    if (stream.readableEnded) return finish();
    if (stream.destroyed) return onClose();
    stream.on('data', onData);
    stream.once('end', onEnd);
    stream.once('error', finish);
    stream.once('close', onClose);
  });
}

function decode(bytes: Buffer, stats: CsvStats): string {
  // ASCII text (most GTFS tables) decodes as latin1, byte for byte: three times faster than the UTF-8
  // decoder, which then has nothing to check (measured: 75 MB in about 30 ms against about 90 ms)
  if (isAscii(bytes)) return bytes.toString('latin1');
  const text = bytes.toString('utf8');
  if (!isUtf8(bytes)) {
    // count the replacement characters the decoder inserted, beyond any encoded in the input itself
    let inText = 0;
    for (let p = text.indexOf('\ufffd'); p >= 0; p = text.indexOf('\ufffd', p + 1)) inText++;
    let encoded = 0;
    for (let p = bytes.indexOf('\ufffd', 0, 'utf8'); p >= 0; p = bytes.indexOf('\ufffd', p + 3, 'utf8')) encoded++;
    stats.invalidUtf8 += Math.max(1, inText - encoded);
  }
  return text;
}

/** Length of the longest prefix that does not end inside a multi-byte UTF-8 sequence. */
function completeUtf8Length(b: Buffer): number {
  const n = b.length;
  for (let back = 1; back <= 3 && back <= n; back++) {
    const x = b[n - back];
    if ((x & 0xc0) === 0x80) continue; // continuation byte: look further back for the lead byte
    if ((x & 0x80) === 0) return n; // ASCII
    const need = (x & 0xe0) === 0xc0 ? 2 : (x & 0xf0) === 0xe0 ? 3 : (x & 0xf8) === 0xf0 ? 4 : 1;
    return back < need ? n - back : n;
  }
  return n;
}
