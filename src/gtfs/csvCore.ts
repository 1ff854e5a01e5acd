// The CSV reader's core: an RFC 4180 state machine over decoded text, pushed in pieces, handing each record
// over as field offsets into the current text (CsvRow), with the caps on a record and a field. It knows no
// bytes, streams or warnings: the adapters in csv.ts (a stream of bytes, a whole text, a table with a
// header) decode, feed it and turn its counts into warnings.

import { StopspanError } from '../common/errors.js';

/** Longest record accepted, in characters (UTF-16 code units; equal to bytes for ASCII text): 1 MiB. */
export const DEFAULT_MAX_RECORD_CHARS = 1024 * 1024;

/**
 * Longest field value handed out, in characters: 64 KiB. The longest real GTFS values are descriptions
 * and URLs of a few hundred characters; a stop name of hundreds of kilobytes, repeated over a table, would
 * make every string built from the names (reports, maps) too long to hold. Refused as too large.
 */
export const MAX_FIELD_CHARS = 64 * 1024;

export interface CsvStats {
  records: number; // data records, header excluded
  paddedValues: number; // values with spaces or tabs around them (trimmed)
  shortRows: number; // rows with fewer fields than the header (missing ones read as '')
  longRows: number; // rows with more fields than the header (extra fields ignored)
  invalidUtf8: number; // byte sequences replaced with U+FFFD
  bytes: number; // bytes read (streaming only)
}

/**
 * One record, reused from row to row: valid only during the callback. Field i spans text[start(i), end(i));
 * a quoted field is held unescaped instead and has start(i) = -1.
 */
export class CsvRow {
  text = '';
  count = 0;
  line = 0;
  /** @internal */ starts: number[] = [];
  /** @internal */ ends: number[] = [];
  /** @internal */ quoted: (string | undefined)[] = [];
  /** @internal for messages: the table, and its column names once known */ file = '';
  /** @internal */ names: string[] | null = null;

  /** The field's value ('' for a missing field); a value over MAX_FIELD_CHARS is refused. */
  get(i: number): string {
    if (i >= this.count || i < 0) return '';
    const s = this.starts[i];
    if (s < 0) {
      const q = this.quoted[i] as string;
      if (q.length > MAX_FIELD_CHARS) this.tooLong(i);
      return q;
    }
    const e = this.ends[i];
    if (e - s > MAX_FIELD_CHARS) this.tooLong(i);
    return s === e ? '' : this.text.slice(s, e);
  }

  private tooLong(i: number): never {
    throw new StopspanError('feed-too-large', `value longer than the cap of ${MAX_FIELD_CHARS} characters`, {
      file: this.file,
      line: this.line,
      column: this.names?.[i] ?? String(i + 1),
    });
  }

  /** Whether the field's value is exactly `value`. */
  equals(i: number, value: string): boolean {
    if (i >= this.count || i < 0) return value === '';
    const s = this.starts[i];
    if (s < 0) return this.quoted[i] === value;
    // a slice compared with === is faster than startsWith here (see CsvCore.skipKey)
    return this.ends[i] - s === value.length && this.text.slice(s, this.ends[i]) === value;
  }

  isBlank(i: number): boolean {
    if (i >= this.count || i < 0) return true;
    const s = this.starts[i];
    return s < 0 ? (this.quoted[i] as string).length === 0 : s === this.ends[i];
  }

  /** All fields as a new array. */
  toArray(): string[] {
    const out = new Array<string>(this.count);
    for (let i = 0; i < this.count; i++) out[i] = this.get(i);
    return out;
  }
}

const COMMA = 44;
const LF = 10;
const CR = 13;
const QUOTE = 34;
const SPACE = 32;
const TAB = 9;

/** Incremental parser core: push decoded text, get each record with the physical line where it starts. */
export class CsvCore {
  private rest = '';
  private line = 1; // physical line number of the first character of `rest`
  private started = false;
  private readonly row = new CsvRow();
  private recLines = 0; // line breaks consumed by the record just parsed
  private soloQuoted = false; // the record just parsed is one quoted field
  private nextQuote = -1; // index of the next '"' in the text being scanned (its length when none; -1 unknown)
  private nextCr = -1; // the same for '\r'
  private skipEnd = 0; // after plain() returned -3: the index after the skipped record's line break
  private head = ''; // the table's first characters, to tell UTF-16 text from a stray NUL
  paddedValues = 0;
  readonly paddedExamples: Array<{ line: number; field: number }> = [];
  strayQuotes = 0;
  readonly strayExamples: Array<{ line: number; field: number }> = [];
  /** Column names for error messages, once the header is known. */
  get names(): string[] | null {
    return this.row.names;
  }
  set names(h: string[] | null) {
    this.row.names = h;
  }
  /**
   * Set by the table parser while the rows of a group to be skipped come in (null otherwise): a plain
   * record whose first field is exactly this key is passed over without being split or handed on. The
   * test cuts that many characters and compares them with === (one native compare of the run), measured
   * faster than startsWith with the key and its comma (a skip-everything scan of Manhattan's
   * stop_times.txt: about 240 ms against 350-450 ms).
   */
  skipKey: string | null = null;
  /** Records passed over by skipKey. */
  skipped = 0;

  constructor(
    private readonly file: string,
    private readonly sink: (row: CsvRow) => void,
    private readonly maxRecordChars = DEFAULT_MAX_RECORD_CHARS,
  ) {
    this.row.file = file;
  }

  push(text: string): void {
    if (!this.started) {
      if (text.length === 0) return;
      this.started = true;
      this.head = text.slice(0, 64);
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    }
    const nul = text.indexOf('\0');
    if (nul >= 0) {
      // parse the lines before it first, so the header (for the column name) and line count are known
      const lineStart = text.lastIndexOf('\n', nul) + 1;
      if (lineStart > 0) this.push(text.slice(0, lineStart));
      this.failNul(text.slice(lineStart), nul - lineStart);
    }
    let from = 0;
    if (this.rest.length > 0) {
      // finish the record cut at the last chunk's end on its own, joined with this text up to its first
      // line break, so that the rest of the text is scanned as it came: reading a joined string character
      // by character is markedly slower (measured: about a quarter of the scan on a big stop_times.txt)
      const nl = text.indexOf('\n');
      if (nl >= 0) {
        const head = this.rest + text.slice(0, nl + 1);
        const used = this.scan(head, false, 0);
        if (used >= head.length) {
          this.rest = '';
          from = nl + 1;
        } else {
          // a record still open at that line break (a quoted one): join what is left as before
          this.rest = head.slice(used);
          text = text.slice(nl + 1);
        }
      }
    }
    const buf = this.rest.length > 0 ? this.rest + text : text;
    const used = this.scan(buf, false, from);
    this.rest = used >= buf.length ? '' : buf.slice(used);
    if (this.rest.length > this.maxRecordChars) this.failTooLong(this.line);
  }

  end(): void {
    if (this.rest.length > 0) this.scan(this.rest, true, 0);
    this.rest = '';
  }

  private columnName(i: number): string {
    return this.names?.[i] ?? String(i + 1);
  }

  private failNul(text: string, at: number): never {
    if (looksUtf16(this.head)) throw new StopspanError('csv-syntax', UTF16_MESSAGE, { file: this.file, line: 1 });
    // the lines before the NUL's were parsed, so `rest` starts at the start of the record holding it (which
    // may be a quoted field spanning lines): walk that record as the scanner does, to the NUL's physical
    // line and its field
    const buf = this.rest + text;
    const pos = this.rest.length + at;
    let line = this.line;
    let field = 0;
    let inQuotes = false;
    let fieldStart = true; // only a quote at the start of a field opens one; later ones are literal
    for (let p = 0; p < pos; p++) {
      const c = buf.charCodeAt(p);
      if (inQuotes) {
        if (c === QUOTE) {
          if (p + 1 < pos && buf.charCodeAt(p + 1) === QUOTE) p++;
          else inQuotes = false;
        } else if (c === LF || (c === CR && buf.charCodeAt(p + 1) !== LF)) line++;
      } else if (c === QUOTE && fieldStart) {
        inQuotes = true;
        fieldStart = false;
      } else if (c === COMMA) {
        field++;
        fieldStart = true;
      } else if (c === LF || (c === CR && buf.charCodeAt(p + 1) !== LF)) {
        line++;
        field = 0;
        fieldStart = true;
      } else if (c !== SPACE && c !== TAB && c !== CR) {
        fieldStart = false;
      }
    }
    throw new StopspanError('csv-syntax', 'NUL byte in the CSV text', {
      file: this.file,
      line,
      column: this.columnName(field),
      value: '\0',
    });
  }

  private failTooLong(line: number): never {
    throw new StopspanError('csv-syntax', `record longer than the cap of ${this.maxRecordChars} characters`, { file: this.file, line });
  }

  /** Parses every complete record in buf from index `from` on; returns the index of the first character not consumed. */
  private scan(buf: string, final: boolean, from: number): number {
    const n = buf.length;
    const row = this.row;
    row.text = buf;
    this.nextQuote = -1;
    this.nextCr = -1;
    let i = from;
    while (i < n) {
      const c = buf.charCodeAt(i);
      if (c === LF) {
        i++;
        this.line++;
        continue;
      }
      if (c === CR) {
        if (i + 1 < n) i += buf.charCodeAt(i + 1) === LF ? 2 : 1;
        else if (final) i++;
        else return i;
        this.line++;
        continue;
      }
      let end = this.plain(buf, i, final);
      if (end === -3) {
        // a record of a skipped group: counted, not split
        i = this.skipEnd;
        this.line++;
        this.skipped++;
        continue;
      }
      if (end === -2) end = this.record(buf, i, final);
      if (end < 0) return i;
      if (end - i > this.maxRecordChars) this.failTooLong(this.line);
      row.line = this.line;
      this.line += this.recLines;
      i = end;
      // a record of one blank unquoted field is a blank (or whitespace-only) line
      if (row.count === 1 && !this.soloQuoted && row.starts[0] === row.ends[0]) continue;
      this.sink(row);
    }
    return i;
  }

  /**
   * Fast path for a record without quotes or lone carriage returns: its line break, then each comma, found
   * with indexOf (native, about twice as fast as reading the characters one by one in JavaScript; measured
   * on a 75 MB stop_times.txt). Only the first and last character of a field are looked at for padding.
   * Returns the index after its line break, -1 if more text is needed, -2 when the record holds a quote
   * or a lone CR (the general path takes it), or -3 when its first field is skipKey (its end in skipEnd).
   */
  private plain(buf: string, start: number, final: boolean): number {
    const n = buf.length;
    if (this.nextQuote < start) {
      const q = buf.indexOf('"', start);
      this.nextQuote = q < 0 ? n : q;
    }
    if (this.nextCr < start) {
      const r = buf.indexOf('\r', start);
      this.nextCr = r < 0 ? n : r;
    }
    let nl = buf.indexOf('\n', start);
    if (nl < 0) {
      if (!final) return this.nextCr < n - 1 || this.nextQuote < n ? -2 : -1;
      nl = n;
    }
    if (this.nextQuote < nl) return -2;
    let end = nl;
    if (this.nextCr < nl) {
      if (this.nextCr !== nl - 1) return -2;
      end = nl - 1; // CRLF
    }
    const key = this.skipKey;
    if (key !== null && nl < n && buf.charCodeAt(start + key.length) === COMMA && buf.slice(start, start + key.length) === key) {
      this.skipEnd = nl + 1;
      return -3;
    }
    const row = this.row;
    const starts = row.starts;
    const ends = row.ends;
    let nf = 0;
    let fs = start;
    for (;;) {
      let c = buf.indexOf(',', fs);
      if (c < 0 || c > end) c = end;
      // field [fs, c): trim spaces and tabs
      let a = fs;
      let e = c;
      if (a < e) {
        let d = buf.charCodeAt(a);
        if (d === SPACE || d === TAB) {
          while (a < e && ((d = buf.charCodeAt(a)) === SPACE || d === TAB)) a++;
        }
        d = e > a ? buf.charCodeAt(e - 1) : 0;
        if (d === SPACE || d === TAB) {
          while (e > a && ((d = buf.charCodeAt(e - 1)) === SPACE || d === TAB)) e--;
        }
        if (a > fs || e < c) {
          this.paddedValues++;
          if (this.paddedExamples.length < 5) this.paddedExamples.push({ line: this.line, field: nf });
        }
      }
      starts[nf] = a;
      ends[nf] = e;
      nf++;
      if (c === end) break;
      fs = c + 1;
    }
    row.count = nf;
    this.recLines = nl < n ? 1 : 0;
    this.soloQuoted = false;
    return nl < n ? nl + 1 : n;
  }

  /** Parses one record starting at i; returns the index after its line break, or -1 if more text is needed. */
  private record(buf: string, start: number, final: boolean): number {
    const n = buf.length;
    const row = this.row;
    const starts = row.starts;
    const ends = row.ends;
    let i = start;
    let nf = 0;
    let lines = 0;
    let soloQuoted = false;
    for (;;) {
      let j = i;
      let c = j < n ? buf.charCodeAt(j) : -1;
      if (c === SPACE || c === TAB) {
        while (c === SPACE || c === TAB) c = ++j < n ? buf.charCodeAt(j) : -1;
      }
      let padded = j > i;
      if (c === QUOTE) {
        let k = j + 1;
        let seg = k;
        let acc = '';
        let value: string;
        for (;;) {
          const q = buf.indexOf('"', k);
          if (q < 0) {
            if (!final) return -1;
            throw new StopspanError('csv-syntax', 'unterminated quoted field', {
              file: this.file,
              line: this.line,
              column: this.columnName(nf),
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
            column: this.columnName(nf),
            value: buf.slice(i, i + 10),
          });
        }
        starts[nf] = -1;
        ends[nf] = -1;
        row.quoted[nf] = value;
        soloQuoted = nf === 0;
      } else {
        let k = j;
        while (k < n) {
          c = buf.charCodeAt(k);
          if (c === COMMA || c === LF || c === CR) break;
          k++;
        }
        if (k >= n && !final) return -1;
        const q = buf.indexOf('"', j);
        if (q >= 0 && q < k) {
          // a quote inside an unquoted field is taken literally, and counted
          this.strayQuotes++;
          if (this.strayExamples.length < 5) this.strayExamples.push({ line: this.line + lines, field: nf });
        }
        let e = k;
        c = e > j ? buf.charCodeAt(e - 1) : 0;
        if (c === SPACE || c === TAB) {
          while (e > j && ((c = buf.charCodeAt(e - 1)) === SPACE || c === TAB)) e--;
          padded = true;
        }
        starts[nf] = j;
        ends[nf] = e;
        i = k;
        if (nf === 0) soloQuoted = false;
      }
      if (padded) {
        this.paddedValues++;
        if (this.paddedExamples.length < 5) this.paddedExamples.push({ line: this.line + lines, field: nf });
      }
      nf++;
      if (i >= n) break; // only when final: the end of the text ends the record
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
    row.count = nf;
    this.recLines = lines;
    this.soloQuoted = soloQuoted;
    return i;
  }
}

export const UTF16_MESSAGE = 'the file is UTF-16; GTFS files must be UTF-8';

/**
 * Whether a table's first characters are UTF-16 text read as bytes: ASCII in UTF-16 puts a NUL beside every
 * character, so one parity of positions is (nearly) all NUL and the other (nearly) none. A byte-order
 * mark read as text (U+FEFF, or FF FE / FE FF decoded as two U+FFFD) is passed over first.
 */
export function looksUtf16(head: string): boolean {
  let s = head;
  if (s.charCodeAt(0) === 0xfeff) s = s.slice(1);
  else if (s.startsWith('\ufffd\ufffd') || s.startsWith('\u00ff\u00fe') || s.startsWith('\u00fe\u00ff')) s = s.slice(2);
  const n = s.length - (s.length % 2);
  if (n < 4) return false;
  const nul = [0, 0];
  for (let k = 0; k < n; k++) if (s.charCodeAt(k) === 0) nul[k % 2]++;
  const half = n / 2;
  return (nul[0] >= 0.8 * half && nul[1] <= 0.2 * half) || (nul[1] >= 0.8 * half && nul[0] <= 0.2 * half);
}
