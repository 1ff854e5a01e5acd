// The one CSV reader for every table: an RFC 4180 state machine over decoded text, fed in chunks, so a
// whole table never sits in memory and the reader keeps up with inflating. Strict where the data would
// otherwise be wrong (unterminated quote, NUL, over-long record, duplicate header), lenient and counted
// where it can safely go on (padded values, invalid UTF-8, rows with too few or too many fields).

import { isUtf8 } from 'node:buffer';
import { StopspanError } from '../common/errors.js';
import type { WarningSink } from '../common/warnings.js';

/** Longest record accepted, in characters (UTF-16 code units; equal to bytes for ASCII text). */
export const DEFAULT_MAX_RECORD_CHARS = 1024 * 1024;

export interface CsvStats {
  records: number; // data records, header excluded
  paddedValues: number;
  shortRows: number; // rows with fewer fields than the header (filled with '')
  longRows: number; // rows with more fields than the header (extra fields ignored)
  invalidUtf8: number; // replacement characters inserted for invalid byte sequences
  bytes: number; // bytes read (streaming only)
}

type RecordSink = (fields: string[], count: number, line: number) => void;

const COMMA = 44;
const LF = 10;
const CR = 13;
const QUOTE = 34;
const SPACE = 32;
const TAB = 9;

/**
 * Incremental parser core: push decoded text, get records with the physical line where each starts.
 * The field array passed to the sink is reused between records.
 */
export class CsvCore {
  private rest = '';
  private line = 1; // physical line number of the first character of `rest`
  private started = false;
  private readonly fields: string[] = [];
  private nf = 0;
  private recLines = 0; // line breaks consumed by the record being parsed
  paddedValues = 0;
  readonly paddedExamples: Array<{ line: number; field: number }> = [];

  constructor(
    private readonly file: string,
    private readonly sink: RecordSink,
    private readonly maxRecordChars = DEFAULT_MAX_RECORD_CHARS,
  ) {}

  push(text: string): void {
    if (!this.started) {
      if (text.length === 0) return;
      this.started = true;
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    }
    const nul = text.indexOf('\0');
    if (nul >= 0) this.failNul(text, nul);
    const buf = this.rest.length > 0 ? this.rest + text : text;
    const used = this.scan(buf, false);
    this.rest = used >= buf.length ? '' : buf.slice(used);
    if (this.rest.length > this.maxRecordChars) this.failTooLong(this.line);
  }

  end(): void {
    if (this.rest.length > 0) this.scan(this.rest, true);
    this.rest = '';
  }

  private failNul(text: string, at: number): never {
    let line = this.line;
    for (let p = this.rest.indexOf('\n'); p >= 0; p = this.rest.indexOf('\n', p + 1)) line++;
    for (let p = text.indexOf('\n'); p >= 0 && p < at; p = text.indexOf('\n', p + 1)) line++;
    throw new StopspanError('csv-syntax', 'NUL byte in CSV text: not a text table', { file: this.file, line, value: '\\0' });
  }

  private failTooLong(line: number): never {
    throw new StopspanError('csv-syntax', `record longer than the cap of ${this.maxRecordChars} characters`, {
      file: this.file,
      line,
    });
  }

  /** Parses every complete record in buf; returns the index of the first character not consumed. */
  private scan(buf: string, final: boolean): number {
    const n = buf.length;
    let i = 0;
    while (i < n) {
      const c = buf.charCodeAt(i);
      if (c === LF) {
        i++;
        this.line++;
        continue;
      }
      if (c === CR) {
        if (i + 1 < n) {
          i += buf.charCodeAt(i + 1) === LF ? 2 : 1;
        } else if (final) {
          i++;
        } else {
          return i;
        }
        this.line++;
        continue;
      }
      const end = this.record(buf, i, final);
      if (end < 0) return i;
      if (end - i > this.maxRecordChars) this.failTooLong(this.line);
      const line = this.line;
      this.line += this.recLines;
      i = end;
      // a record of one blank (whitespace-only) field is a blank line
      if (this.nf === 1 && this.fields[0] === '' && !this.lastQuoted) continue;
      this.sink(this.fields, this.nf, line);
    }
    return i;
  }

  private lastQuoted = false;

  /** Parses one record starting at i; returns the index after its line break, or -1 if more text is needed. */
  private record(buf: string, start: number, final: boolean): number {
    const n = buf.length;
    const fields = this.fields;
    let i = start;
    let nf = 0;
    let lines = 0;
    let quotedOnly = false;
    for (;;) {
      let j = i;
      let c = j < n ? buf.charCodeAt(j) : -1;
      while (c === SPACE || c === TAB) c = ++j < n ? buf.charCodeAt(j) : -1;
      let value: string;
      let padded = false;
      if (c === QUOTE) {
        if (j > i) padded = true;
        let k = j + 1;
        let seg = k;
        let acc = '';
        for (;;) {
          const q = buf.indexOf('"', k);
          if (q < 0) {
            if (!final) return -1;
            throw new StopspanError('csv-syntax', 'unterminated quoted field', {
              file: this.file,
              line: this.line,
              column: String(nf + 1),
            });
          }
          if (q + 1 >= n && !final) return -1;
          if (q + 1 < n && buf.charCodeAt(q + 1) === QUOTE) {
            acc += buf.slice(seg, q + 1);
            k = q + 2;
            seg = k;
            continue;
          }
          value = acc + buf.slice(seg, q);
          i = q + 1;
          break;
        }
        for (let p = value.indexOf('\n'); p >= 0; p = value.indexOf('\n', p + 1)) lines++;
        c = i < n ? buf.charCodeAt(i) : -1;
        if (c === SPACE || c === TAB) {
          while (c === SPACE || c === TAB) c = ++i < n ? buf.charCodeAt(i) : -1;
          padded = true;
          if (c === -1 && !final) return -1;
        }
        if (c !== COMMA && c !== LF && c !== CR && c !== -1) {
          throw new StopspanError('csv-syntax', 'unexpected character after a closing quote', {
            file: this.file,
            line: this.line + lines,
            column: String(nf + 1),
            value: buf.slice(i, i + 10),
          });
        }
        quotedOnly = nf === 0;
      } else {
        let k = j;
        while (k < n) {
          c = buf.charCodeAt(k);
          if (c === COMMA || c === LF || c === CR) break;
          k++;
        }
        if (k >= n && !final) return -1;
        let e = k;
        while (e > j) {
          const d = buf.charCodeAt(e - 1);
          if (d !== SPACE && d !== TAB) break;
          e--;
        }
        if (j > i || e < k) padded = true;
        value = j === e ? '' : buf.slice(j, e);
        i = k;
        if (nf === 0) quotedOnly = false;
      }
      if (padded) {
        this.paddedValues++;
        if (this.paddedExamples.length < 5) this.paddedExamples.push({ line: this.line + lines, field: nf });
      }
      fields[nf++] = value;
      if (i >= n) break; // final: end of text ends the record
      c = buf.charCodeAt(i);
      if (c === COMMA) {
        i++;
        continue;
      }
      if (c === CR) {
        if (i + 1 < n) i += buf.charCodeAt(i + 1) === LF ? 2 : 1;
        else if (!final) return -1;
        else i++;
      } else {
        i++; // LF
      }
      lines++;
      break;
    }
    this.nf = nf;
    this.recLines = lines;
    this.lastQuoted = quotedOnly;
    return i;
  }
}

function checkHeader(header: string[], file: string): void {
  const seen = new Set<string>();
  for (const h of header) {
    if (seen.has(h)) {
      throw new StopspanError('csv-syntax', 'duplicate column name in header', { file, line: 1, column: h, value: h });
    }
    seen.add(h);
  }
}

export interface ParsedCsv {
  header: string[];
  rows: string[][];
  lines: number[]; // physical line where each row starts (1-based; the header is usually line 1)
}

/**
 * Parses a whole CSV text at once (small files such as ridership tables), by the same rules as readCsv.
 * Rows are padded with '' or cut to the header's length.
 */
export function parseCsv(
  text: string,
  { file, warnings, maxRecordChars = DEFAULT_MAX_RECORD_CHARS }: { file: string; warnings?: WarningSink; maxRecordChars?: number },
): ParsedCsv {
  let header: string[] | null = null;
  const rows: string[][] = [];
  const lines: number[] = [];
  const stats = emptyStats();
  const core = new CsvCore(
    file,
    (fields, count, line) => {
      if (header === null) {
        header = fields.slice(0, count);
        checkHeader(header, file);
        return;
      }
      rows.push(fitRow(fields, count, header.length, stats).slice(0, header.length));
      lines.push(line);
    },
    maxRecordChars,
  );
  core.push(text);
  core.end();
  stats.paddedValues = core.paddedValues;
  stats.records = rows.length;
  if (warnings) reportStats(warnings, file, header ?? [], core, stats);
  return { header: header ?? [], rows, lines };
}

function emptyStats(): CsvStats {
  return { records: 0, paddedValues: 0, shortRows: 0, longRows: 0, invalidUtf8: 0, bytes: 0 };
}

function fitRow(fields: string[], count: number, width: number, stats: CsvStats): string[] {
  if (count < width) {
    stats.shortRows++;
    for (let k = count; k < width; k++) fields[k] = '';
  } else if (count > width) {
    stats.longRows++;
  }
  fields.length = Math.max(width, count);
  return fields;
}

function reportStats(warnings: WarningSink, file: string, header: string[], core: CsvCore, stats: CsvStats): void {
  if (core.paddedValues > 0) {
    const ex = core.paddedExamples.map((p) => `${file}:${p.line} column ${header[p.field] ?? p.field + 1}`);
    warnings.add('padded-values', 'values padded with spaces were trimmed', ex[0], core.paddedValues);
    // the sink keeps only the first example per add; add the rest without counting them again
    for (const e of ex.slice(1)) warnings.add('padded-values', 'values padded with spaces were trimmed', e, 0);
  }
  if (stats.shortRows > 0) warnings.add('short-rows', 'rows with fewer fields than the header (missing fields read as blank)', file, stats.shortRows);
  if (stats.longRows > 0) warnings.add('long-rows', 'rows with more fields than the header (extra fields ignored)', file, stats.longRows);
  if (stats.invalidUtf8 > 0) warnings.add('invalid-utf8', 'invalid UTF-8 byte sequences replaced with U+FFFD', file, stats.invalidUtf8);
}

export interface ReadCsvOptions {
  file: string;
  /** Called once with the header (trimmed, BOM removed); throw from here to reject missing columns. */
  onHeader: (header: string[]) => void;
  /** Called per data record; `fields` is reused and has at least header.length entries. */
  onRow: (fields: string[], line: number) => void;
  warnings?: WarningSink;
  maxRecordChars?: number;
  /** Called now and then with the bytes read so far. */
  onBytes?: (bytes: number) => void;
}

/** Streams a CSV table from bytes (a Readable or any async iterable of Buffers). */
export async function readCsv(
  stream: AsyncIterable<Buffer | Uint8Array | string>,
  { file, onHeader, onRow, warnings, maxRecordChars = DEFAULT_MAX_RECORD_CHARS, onBytes }: ReadCsvOptions,
): Promise<CsvStats> {
  let header: string[] | null = null;
  let width = 0;
  const stats = emptyStats();
  const core = new CsvCore(
    file,
    (fields, count, line) => {
      if (header === null) {
        header = fields.slice(0, count);
        checkHeader(header, file);
        width = header.length;
        onHeader(header);
        return;
      }
      stats.records++;
      if (count !== width) fitRow(fields, count, width, stats);
      else if (fields.length !== count) fields.length = count;
      onRow(fields, line);
    },
    maxRecordChars,
  );
  let carry: Buffer | null = null;
  let sinceReport = 0;
  for await (const chunk of stream) {
    if (typeof chunk === 'string') {
      core.push(chunk);
      continue;
    }
    let bytes = Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength);
    stats.bytes += bytes.length;
    sinceReport += bytes.length;
    if (carry) {
      bytes = Buffer.concat([carry, bytes]);
      carry = null;
    }
    const cut = completeUtf8Length(bytes);
    if (cut < bytes.length) {
      carry = Buffer.from(bytes.subarray(cut));
      bytes = bytes.subarray(0, cut);
    }
    core.push(decode(bytes, stats));
    if (onBytes && sinceReport >= 4 << 20) {
      sinceReport = 0;
      onBytes(stats.bytes);
    }
  }
  if (carry) core.push(decode(carry, stats));
  core.end();
  if (onBytes) onBytes(stats.bytes);
  if (header === null) onHeader([]);
  stats.paddedValues = core.paddedValues;
  if (warnings) reportStats(warnings, file, header ?? [], core, stats);
  return stats;
}

function decode(bytes: Buffer, stats: CsvStats): string {
  const text = bytes.toString('utf8');
  if (!isUtf8(bytes)) {
    // count the replacement characters the decoder inserted beyond those encoded in the input
    let inText = 0;
    for (let p = text.indexOf('\ufffd'); p >= 0; p = text.indexOf('\ufffd', p + 1)) inText++;
    const encoded = countEncodedReplacement(bytes);
    stats.invalidUtf8 += Math.max(1, inText - encoded);
  }
  return text;
}

function countEncodedReplacement(bytes: Buffer): number {
  let c = 0;
  for (let p = bytes.indexOf('\ufffd', 0, 'utf8'); p >= 0; p = bytes.indexOf('\ufffd', p + 3, 'utf8')) c++;
  return c;
}

/** Length of the longest prefix that does not end inside a multi-byte UTF-8 sequence. */
function completeUtf8Length(b: Buffer): number {
  const n = b.length;
  for (let back = 1; back <= 3 && back <= n; back++) {
    const x = b[n - back];
    if ((x & 0xc0) === 0x80) continue; // continuation byte: keep looking for the lead
    if ((x & 0x80) === 0) return n; // ASCII
    const need = (x & 0xe0) === 0xc0 ? 2 : (x & 0xf0) === 0xe0 ? 3 : (x & 0xf8) === 0xf0 ? 4 : 1;
    return back < need ? n - back : n;
  }
  return n;
}
