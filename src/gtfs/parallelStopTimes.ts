// Parses a big stop_times.txt on worker threads while the main thread inflates it: the inflated bytes are
// cut into blocks of whole records at line breaks, counted for their first line number, and handed to the
// workers in turn; their typed rows come back and are replayed into the sink in table order, so the result,
// the warnings and the first error reported are those of reading the table in one pass. A block holding a
// quote (a quoted field may hold a line break) ends the cutting: from there on the main thread parses the
// rest itself. Pays on two cores because parsing, not inflating, is the slower half (measured, see README).

import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { StopspanError, type ErrorCode, type ErrorContext } from '../common/errors.js';
import { CsvBlockParser, mergeCsvStats, reportCsvStats, type CsvBlockStats } from './csv.js';
import { STOP_TIMES_FILE, StopTimesBuffer, StopTimesRowReader, type StopTimesColumns, type StopTimesLookup, type StopTimesSink } from './stopTimesRows.js';
import type { WarningSink } from '../common/warnings.js';

/** Bytes of records per block handed to a worker. */
const DEFAULT_BLOCK_BYTES = 2 << 20;
/** Blocks in flight per worker before the reader waits (bounds the memory held in blocks and results). */
const IN_FLIGHT_PER_WORKER = 3;
/** Below this many bytes of stop_times.txt one thread reads it: starting workers would cost more. */
export const PARALLEL_MIN_BYTES = 16 << 20;

const workerUrl = new URL('./stopTimesWorker.js', import.meta.url);

/** How many worker threads to parse a table of `bytes` with (0: read it on the main thread). */
export function stopTimesThreads(bytes: number | undefined, wanted: number | 'auto'): number {
  // the worker runs from the built code only (not from TypeScript sources under a test runner)
  if (!existsSync(fileURLToPath(workerUrl))) return 0;
  if (wanted === 'auto') return (bytes ?? 0) >= PARALLEL_MIN_BYTES && availableParallelism() >= 2 ? 2 : 0;
  return Math.max(0, Math.floor(wanted));
}

/** The one-pass rest of a table, read on the main thread. */
interface Serial {
  parser: CsvBlockParser;
  rows: StopTimesBuffer;
  reader: () => StopTimesRowReader | null;
  error: unknown;
}

interface BlockResult {
  k: number;
  n?: number;
  cols?: { trip: Int32Array; stop: Int32Array; seq: Int32Array; arr: Int32Array; dep: Int32Array; dist: Float64Array; tp: Uint8Array; ns: Uint8Array };
  stats?: CsvBlockStats;
  atStation?: number;
  error?: { code: ErrorCode | null; message: string; context: ErrorContext };
}

export interface ParallelStopTimesOptions {
  threads: number;
  lookup: StopTimesLookup;
  /** Maps the header to column indices; throws for a missing required column. */
  columns: (header: string[]) => StopTimesColumns;
  sink: StopTimesSink;
  warnings: WarningSink;
  maxRecordChars: number;
  onBytes?: (bytes: number) => void;
  /** Bytes per block (default 2 MiB); small values let tests cut a small table into many blocks. */
  blockBytes?: number;
}

/** Reads stop_times.txt from `stream` in blocks on `threads` workers; returns the records read and rows naming a station. */
export async function readStopTimesParallel(stream: AsyncIterable<Buffer>, o: ParallelStopTimesOptions): Promise<{ records: number; atStation: number }> {
  const F = STOP_TIMES_FILE;
  const BLOCK_BYTES = o.blockBytes ?? DEFAULT_BLOCK_BYTES;
  const workers: Worker[] = [];
  let failed: Error | null = null;
  const waiting = new Map<number, BlockResult>();
  let wake: (() => void) | null = null;
  const arrived = (r: BlockResult): void => {
    waiting.set(r.k, r);
    wake?.();
  };
  try {
    for (let w = 0; w < o.threads; w++) {
      const worker = new Worker(workerUrl);
      worker.on('message', arrived);
      worker.on('error', (e) => {
        failed = e;
        wake?.();
      });
      workers.push(worker);
    }
    const total: CsvBlockStats = { records: 0, paddedValues: 0, shortRows: 0, longRows: 0, invalidUtf8: 0, bytes: 0, paddedExamples: [], strayQuotes: 0, strayExamples: [], replacedAt: [] };
    let atStation = 0;
    let header: string[] | null = null;
    let cols: StopTimesColumns | null = null;
    let line = 2; // the first line of the next block
    let sent = 0;
    let replayed = 0;
    let bytesRead = 0;
    let sinceReport = 0;
    let pending: Buffer[] = [];
    let pendingBytes = 0;
    // the one-pass rest of the table, on this thread; its error waits until the blocks before it are replayed
    let serial: Serial | null = null;

    const replay = (r: BlockResult): void => {
      if (r.error) {
        const e = r.error;
        if (e.code === null) throw new Error(e.message);
        throw new StopspanError(e.code, e.message, e.context);
      }
      const c = r.cols!;
      const sink = o.sink;
      for (let q = 0; q < r.n!; q++) sink.push(c.trip[q], c.stop[q], c.seq[q], c.arr[q], c.dep[q], c.dist[q], c.tp[q], c.ns[q]);
      mergeCsvStats(total, r.stats!);
      atStation += r.atStation!;
    };
    /** Replays the finished blocks that are next in order; waits while more than `keep` are in flight. */
    const drain = async (keep: number): Promise<void> => {
      for (;;) {
        while (waiting.has(replayed)) {
          const r = waiting.get(replayed)!;
          waiting.delete(replayed);
          replayed++;
          replay(r);
        }
        if (failed) throw failed;
        if (sent - replayed <= keep) return;
        await new Promise<void>((resolve) => (wake = resolve));
        wake = null;
      }
    };
    const startSerial = (firstLine: number, knownHeader: string[] | null): Serial => {
      const rows = new StopTimesBuffer();
      let reader: StopTimesRowReader | null = knownHeader ? new StopTimesRowReader(o.lookup, cols!, rows) : null;
      const parser = new CsvBlockParser(F, knownHeader, (row) => reader!.read(row), {
        firstLine,
        maxRecordChars: o.maxRecordChars,
        onHeader: (h) => {
          header = h;
          cols = o.columns(h);
          reader = new StopTimesRowReader(o.lookup, cols, rows);
        },
      });
      return { parser, rows, reader: () => reader, error: null };
    };
    const pushSerial = (bytes: Buffer): void => {
      const s = serial!;
      if (s.error !== null) return;
      try {
        s.parser.push(bytes);
      } catch (e) {
        s.error = e;
      }
    };
    const send = (bytes: Buffer, lines: number): void => {
      const k = sent++;
      const own = bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength ? bytes : Buffer.from(bytes);
      workers[k % workers.length].postMessage({ type: 'block', k, bytes: own, firstLine: line }, [own.buffer as ArrayBuffer]);
      line += lines;
    };
    const keepPending = (b: Buffer): void => {
      pending = b.length > 0 ? [b] : [];
      pendingBytes = b.length;
    };

    const flush = async (final: boolean): Promise<void> => {
      if (pendingBytes === 0) return;
      const buf = pending.length === 1 ? pending[0] : Buffer.concat(pending, pendingBytes);
      keepPending(Buffer.alloc(0));
      if (header === null) {
        const nl = buf.indexOf(10);
        if (nl < 0 && !final && buf.length <= o.maxRecordChars) return keepPending(buf);
        const end = nl < 0 ? buf.length : nl + 1;
        if (nl < 0 || buf.subarray(0, end).indexOf(34) >= 0) {
          // a quoted (or endless) header: the whole table in one pass on this thread
          serial = startSerial(1, null);
          pushSerial(buf);
          return;
        }
        const hp = new CsvBlockParser(F, null, () => {}, { maxRecordChars: o.maxRecordChars, onHeader: (h) => (header = h) });
        hp.push(buf.subarray(0, end));
        hp.end();
        header ??= [];
        cols = o.columns(header);
        for (const w of workers) w.postMessage({ type: 'init', lookup: o.lookup, cols, header, maxRecordChars: o.maxRecordChars });
        keepPending(buf.subarray(end));
        if (final) await flush(true);
        return;
      }
      let cut = final ? buf.length : buf.lastIndexOf(10) + 1;
      if (cut === 0 && buf.length < 4 * BLOCK_BYTES) return keepPending(buf); // no line break yet: wait for more
      if (cut === 0 || buf.subarray(0, cut).indexOf(34) >= 0) {
        // a quote (a field may hold a line break) or no line breaks at all: the rest in one pass here
        serial = startSerial(line, header);
        pushSerial(buf);
        return;
      }
      keepPending(Buffer.from(buf.subarray(cut))); // a copy: the block's memory may move to the worker
      const block = buf.subarray(0, cut);
      send(block, countLines(block));
      await drain(IN_FLIGHT_PER_WORKER * workers.length);
    };

    for await (const chunk of stream) {
      bytesRead += chunk.length;
      sinceReport += chunk.length;
      if (o.onBytes && sinceReport >= 4 << 20) {
        sinceReport = 0;
        o.onBytes(bytesRead);
      }
      if (serial) {
        pushSerial(chunk);
        continue;
      }
      pending.push(chunk);
      pendingBytes += chunk.length;
      if (pendingBytes >= BLOCK_BYTES) await flush(false);
    }
    if (!serial) await flush(true);
    await drain(0);
    const rest = serial as Serial | null;
    if (rest) {
      if (rest.error === null) {
        try {
          mergeCsvStats(total, rest.parser.end());
        } catch (e) {
          rest.error = e;
        }
      }
      if (rest.error !== null) throw rest.error;
      rest.rows.replay(o.sink);
      atStation += rest.reader()?.atStation ?? 0;
    }
    if (header === null) cols = o.columns([]); // an empty table: its missing columns are the error
    o.onBytes?.(bytesRead);
    total.bytes = bytesRead;
    reportCsvStats(o.warnings, F, header ?? [], total);
    return { records: total.records, atStation };
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
}

/** Line breaks in a block as the CSV reader counts them: LF, CRLF and a lone CR each end a line. */
function countLines(b: Buffer): number {
  let n = 0;
  for (let p = b.indexOf(10); p >= 0; p = b.indexOf(10, p + 1)) n++;
  for (let p = b.indexOf(13); p >= 0; p = b.indexOf(13, p + 1)) if (b[p + 1] !== 10) n++;
  return n;
}
