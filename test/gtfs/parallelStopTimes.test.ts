// stop_times.txt parsed in blocks on worker threads must give exactly what one pass on one thread gives:
// the same rows in the same order, the same CSV counts and warnings, and the same first error, named by the
// same line. The worker runs from the built code, so these tests load dist/ (built by test/globalSetup.ts).
// The one-pass reference is the project's own CSV reader, itself checked against csv-parse in csv.test.ts.

import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

const DIST = resolve(__dirname, '../../dist');
const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');

type Mod = typeof import('../../src/gtfs/parallelStopTimes.js');
type Rows = typeof import('../../src/gtfs/stopTimesRows.js');
type Csv = typeof import('../../src/gtfs/csv.js');
type Warn = typeof import('../../src/common/warnings.js');
type ReadFeed = typeof import('../../src/gtfs/readFeed.js');
const load = async () => ({
  par: (await import(join(DIST, 'gtfs/parallelStopTimes.js'))) as Mod,
  rows: (await import(join(DIST, 'gtfs/stopTimesRows.js'))) as Rows,
  csv: (await import(join(DIST, 'gtfs/csv.js'))) as Csv,
  warn: (await import(join(DIST, 'common/warnings.js'))) as Warn,
});

const STOPS = Array.from({ length: 40 }, (_, i) => `S${i}`);
const TRIPS = Array.from({ length: 300 }, (_, i) => `trip_${i}`);
const HEADER = 'trip_id,arrival_time,departure_time,stop_id,stop_sequence,pickup_type,drop_off_type,timepoint';

/** A synthetic stop_times.txt: every trip runs 20 stops; `edit` may change a data line (0-based data row index). */
function table(eol = '\n', edit: (line: string, r: number) => string = (l) => l): string {
  const out = [HEADER];
  let r = 0;
  for (let t = 0; t < TRIPS.length; t++) {
    for (let k = 0; k < 20; k++) {
      const s = 6 * 3600 + t * 60 + k * 90;
      const hms = `${String(Math.floor(s / 3600)).padStart(2, '0')}:${String(Math.floor(s / 60) % 60).padStart(2, '0')}:${String(s % 60).padStart(2, '0')}`;
      out.push(edit(`${TRIPS[t]},${hms},${hms},${STOPS[(t + k) % STOPS.length]},${k + 1},0,0,${k % 5 === 0 ? 1 : 0}`, r++));
    }
  }
  return out.join(eol) + eol;
}

const lookup = () => ({
  tripIdx: new Map(TRIPS.filter((_, i) => i % 7 !== 3).map((id, i) => [id, i])), // some trips not kept
  stopIndex: new Map(STOPS.map((id, i) => [id, i])),
  station: Uint8Array.from(STOPS, (_, i) => (i === 5 ? 1 : 0)),
});

/** Cuts bytes into stream chunks of an awkward size, so records and UTF-8 sequences straddle them. */
function* chunks(b: Buffer, size = 7777): Generator<Buffer> {
  for (let i = 0; i < b.length; i += size) yield b.subarray(i, i + size);
}

type Errors = typeof import('../../src/common/errors.js');
const { StopspanError } = (await import(join(DIST, 'common/errors.js'))) as Errors;
const columnsOf = (h: string[]) => {
  const c: Record<string, number> = {};
  for (const name of ['trip_id', 'stop_id', 'stop_sequence']) {
    c[name] = h.indexOf(name);
    if (c[name] < 0) throw new StopspanError('missing-column', `required column ${name} is missing`, { file: 'stop_times.txt', line: 1, column: name });
  }
  for (const name of ['arrival_time', 'departure_time', 'shape_dist_traveled', 'timepoint', 'pickup_type', 'drop_off_type']) c[name] = h.indexOf(name);
  return c as never;
};

async function readBoth(text: string, blockBytes = 4096) {
  const { par, rows, csv, warn } = await load();
  const bytes = Buffer.from(text);
  const one = async () => {
    const sink = new rows.StopTimesBuffer();
    const warnings = new warn.WarningSink();
    let reader: InstanceType<Rows['StopTimesRowReader']> | null = null;
    try {
      const stats = await csv.readCsv(chunks(bytes), { file: 'stop_times.txt', warnings, onHeader: (h) => (reader = new rows.StopTimesRowReader(lookup(), columnsOf(h), sink)), onRow: (r) => reader!.read(r) });
      return { sink, warnings: warnings.list(), records: stats.records, atStation: reader!.atStation, error: null as string | null };
    } catch (e) {
      return { sink, warnings: [], records: 0, atStation: 0, error: (e as { oneLine(): string }).oneLine() };
    }
  };
  const many = async () => {
    const sink = new rows.StopTimesBuffer();
    const warnings = new warn.WarningSink();
    try {
      const r = await par.readStopTimesParallel(chunks(bytes) as unknown as AsyncIterable<Buffer>, { threads: 2, lookup: lookup(), columns: columnsOf, sink, warnings, maxRecordChars: 1 << 20, blockBytes });
      return { sink, warnings: warnings.list(), records: r.records, atStation: r.atStation, error: null as string | null };
    } catch (e) {
      return { sink, warnings: [], records: 0, atStation: 0, error: (e as { oneLine(): string }).oneLine() };
    }
  };
  return { one: await one(), many: await many() };
}

function expectSame({ one, many }: Awaited<ReturnType<typeof readBoth>>): void {
  expect(many.error).toBe(one.error);
  if (one.error) return;
  expect(many.records).toBe(one.records);
  expect(many.atStation).toBe(one.atStation);
  expect(many.warnings).toEqual(one.warnings);
  expect(many.sink.n).toBe(one.sink.n);
  for (const k of ['trip', 'stop', 'seq', 'arr', 'dep', 'tp', 'ns'] as const) expect(many.sink[k].subarray(0, many.sink.n)).toEqual(one.sink[k].subarray(0, one.sink.n));
}

describe('readStopTimesParallel', () => {
  it('gives the rows, counts and warnings of one pass, cut into many blocks, LF or CRLF', async () => {
    for (const eol of ['\n', '\r\n']) {
      const both = await readBoth(table(eol));
      expect(both.one.records).toBe(6000);
      expect(both.one.sink.n).toBeGreaterThan(4000); // the kept trips only
      expect(both.one.atStation).toBeGreaterThan(0); // stop S5 is a station
      expectSame(both);
    }
  });

  it('counts padded values and lines as one pass does, and keeps the first examples in table order', async () => {
    const both = await readBoth(table('\n', (l, r) => (r % 997 === 5 ? l.replace(',S', ', S') : l)));
    expect(both.one.warnings.find((w) => w.code === 'padded-values')?.count).toBeGreaterThan(3);
    expectSame(both);
  });

  it('reports the first bad value in table order, with its line, though later blocks fail too', async () => {
    const both = await readBoth(table('\n', (l, r) => (r === 3020 ? l.replace(',0,0,', ',9,0,') : r === 5000 ? l.replace(/,S\d+,/, ',NOPE,') : l)));
    expect(both.one.error).toMatch(/^stop_times\.txt:3022 column pickup_type: /);
    expectSame(both);
  });

  it('switches to one pass from the first block with a quote (a quoted field may hold a line break)', async () => {
    const both = await readBoth(table('\n', (l, r) => (r === 2500 ? l.replace(/,S(\d+),/, ',"S$1",') : r === 2600 ? l.replace(/^trip_(\d+),/, '"trip_$1",') : l)));
    expectSame(both);
    const bad = await readBoth(table('\n', (l, r) => (r === 2500 ? l.replace(/,S(\d+),/, ',"S$1",') : r === 4000 ? l.replace(/,\d+,0,0,/, ',x,0,0,') : l)));
    expect(bad.one.error).toMatch(/^stop_times\.txt:4002 column stop_sequence: /);
    expectSame(bad);
  });

  it('takes a quoted header, a missing column and an empty table as one pass does', async () => {
    expectSame(await readBoth(table().replace('trip_id,', '"trip_id",')));
    const missing = await readBoth(table().replace('stop_sequence', 'stop_seq'));
    expect(missing.one.error).toBe('stop_times.txt:1 column stop_sequence: required column stop_sequence is missing');
    expectSame(missing);
    expectSame(await readBoth(HEADER + '\n'));
  });
});

const BUS = join(FEEDS, 'nyct-bus-manhattan.zip');
describe.skipIf(!existsSync(BUS))('readFeed with worker threads on nyct-bus-manhattan.zip', () => {
  it('reads the same feed with threads 2 as with threads 0', async () => {
    const { readFeed } = (await import(join(DIST, 'gtfs/readFeed.js'))) as ReadFeed;
    const a = await readFeed(BUS, { date: '2026-10-14', threads: 0 });
    const b = await readFeed(BUS, { date: '2026-10-14', threads: 2 });
    expect([...b.stopTimes.keys()]).toEqual([...a.stopTimes.keys()]);
    for (const [k, v] of a.stopTimes) expect(b.stopTimes.get(k)).toEqual(v);
    expect(b.warnings).toEqual(a.warnings);
    expect(b.rowCounts).toEqual(a.rowCounts);
  }, 120_000);
});
