// A worker thread that parses blocks of stop_times.txt for readFeed (see parallelStopTimes.ts): each block
// is a run of whole records cut at a line break, with its first line number; it comes back as typed
// columns with the block's CSV counts, or as the first error in it.

import { parentPort } from 'node:worker_threads';
import { isStopspanError } from '../common/errors.js';
import { CsvBlockParser } from './csv.js';
import { STOP_TIMES_FILE, StopTimesBuffer, StopTimesRowReader, type StopTimesColumns, type StopTimesLookup } from './stopTimesRows.js';

export interface InitMessage {
  type: 'init';
  lookup: StopTimesLookup;
  cols: StopTimesColumns;
  header: string[];
  maxRecordChars: number;
}
export interface BlockMessage {
  type: 'block';
  k: number;
  bytes: Uint8Array;
  firstLine: number;
}

let init: InitMessage | null = null;

parentPort?.on('message', (m: InitMessage | BlockMessage) => {
  if (m.type === 'init') {
    init = m;
    return;
  }
  const port = parentPort!;
  try {
    if (!init) throw new Error('block before init');
    const buf = new StopTimesBuffer();
    const reader = new StopTimesRowReader(init.lookup, init.cols, buf);
    const parser = new CsvBlockParser(STOP_TIMES_FILE, init.header, (row) => reader.read(row), { firstLine: m.firstLine, maxRecordChars: init.maxRecordChars });
    parser.push(Buffer.from(m.bytes.buffer, m.bytes.byteOffset, m.bytes.byteLength));
    const stats = parser.end();
    const n = buf.n;
    const cols = { trip: buf.trip.slice(0, n), stop: buf.stop.slice(0, n), seq: buf.seq.slice(0, n), arr: buf.arr.slice(0, n), dep: buf.dep.slice(0, n), dist: buf.dist.slice(0, n), tp: buf.tp.slice(0, n), ns: buf.ns.slice(0, n) };
    port.postMessage({ k: m.k, n, cols, stats, atStation: reader.atStation }, Object.values(cols).map((a) => a.buffer));
  } catch (e) {
    const error = isStopspanError(e) ? { code: e.code, message: e.message, context: e.context } : { code: null, message: e instanceof Error ? e.message : String(e), context: {} };
    port.postMessage({ k: m.k, error });
  }
});
