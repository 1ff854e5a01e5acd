// The CSV reader against csv-parse (the reference reader), record for record: hand-made edge cases, text
// split into chunks at every possible boundary, random tables, and every table of the real feeds. Then
// the strict cases: each error pins its code and where it points (file, line, column).

import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { Readable } from 'node:stream';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { parse as parseStream } from 'csv-parse';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { StopspanError } from '../../src/common/errors.js';
import { WarningSink } from '../../src/common/warnings.js';
import { openFeed } from '../../src/gtfs/archive.js';
import { parseCsv, readCsv } from '../../src/gtfs/csv.js';
import { MAX_FIELD_CHARS, type CsvRow } from '../../src/gtfs/csvCore.js';
import { thrown, rejected } from '../helpers/errors.js';

// csv-parse options that state the same rules: BOM dropped, values trimmed outside quotes, blank lines
// skipped, ragged rows allowed (our reader pads or ignores them and counts it)
const ORACLE = { bom: true, trim: true, skip_empty_lines: true, relax_column_count: true } as const;

function oracle(text: string): string[][] {
  return parse(text, ORACLE) as string[][];
}

/** All records (header included) as our streaming reader sees them, text fed in the given pieces. */
async function ours(pieces: Array<string | Buffer>, file = 't.csv'): Promise<{ records: string[][]; lines: number[] }> {
  const records: string[][] = [];
  const lines: number[] = [];
  await readCsv(
    (async function* () {
      yield* pieces.map((p) => (typeof p === 'string' ? Buffer.from(p, 'utf8') : p));
    })(),
    {
      file,
      onHeader: (h) => {
        if (h.length > 0) {
          records.push(h);
          lines.push(1);
        }
      },
      onRow: (row: CsvRow) => {
        records.push(row.toArray());
        lines.push(row.line);
      },
    },
  );
  return { records, lines };
}

const CASES: Record<string, string> = {
  'quoted commas': 'a,b,c\n1,"x,y",3\n',
  'doubled quotes': 'a,b\n"say ""hi""",2\n"""",""\n',
  'newlines inside quotes': 'a,b\n"line one\nline two",2\n"cr\r\nlf",3\n',
  'BOM and CRLF': '\ufeffstop_id,stop_name\r\nS1,Harbour Gate\r\nS2,Mill Lane\r\n',
  'padded values': 'stop_id,stop_lat,stop_lon\nS1,  40.712800 , -74.006000  \nS2,\t40.7,-74.0\t\n',
  'padding around quotes': 'a,b\n  "x" ,y\n',
  'missing optional columns and short rows': 'trip_id,stop_id,stop_sequence,timepoint\nT1,S1,1\nT1,S2,2,1\n',
  'extra columns': 'a,b\n1,2,3,4\n5,6\n',
  'blank trailing lines': 'a,b\n1,2\n\n\n\r\n',
  'no final line break': 'a,b\n1,2',
  'empty fields': 'a,b,c\n,,\n1,,3\n',
  unicode: 'stop_id,stop_name\nV1,Vellmoor Strandpromenade – Süd\nV2,"Café ""Am Tor"""\nV3,東口\n',
  'trailing commas in header and rows': 'a,b,,\n1,2,,\n',
  'CR only line breaks': 'a,b\r1,2\r3,4\r',
};

/** The bytes cut at the given offsets (taken modulo the length), in order. */
function cutAt(bytes: Buffer, cuts: number[]): Buffer[] {
  const points = [...new Set(cuts.map((c) => c % bytes.length))].sort((a, b) => a - b);
  const pieces: Buffer[] = [];
  let prev = 0;
  for (const p of points) {
    pieces.push(bytes.subarray(prev, p));
    prev = p;
  }
  pieces.push(bytes.subarray(prev));
  return pieces;
}

/** The records our reader hands on when it skips groups by the key column: header, then the kept rows. */
async function oursGrouped(
  pieces: Array<string | Buffer>,
  column: string,
  keep: (v: string) => boolean,
): Promise<{ records: string[][]; lines: number[]; asked: string[]; count: number }> {
  const records: string[][] = [];
  const lines: number[] = [];
  const asked: string[] = [];
  const stats = await readCsv(
    pieces.map((p) => (typeof p === 'string' ? Buffer.from(p, 'utf8') : p)),
    {
      file: 'g.csv',
      onHeader: (h) => records.push(h),
      onRow: (row) => {
        records.push(row.toArray());
        lines.push(row.line);
      },
      groupKey: {
        column,
        keep: (v) => {
          asked.push(v);
          return keep(v);
        },
      },
    },
  );
  return { records, lines, asked, count: stats.records };
}

describe('the CSV reader skipping groups of rows by a key column', () => {
  // the rows handed on must be csv-parse's records [csv-parse, reference library] whose key is kept, with
  // their physical lines; keep() is asked once per run of equal keys; every row is still counted
  const TEXT = 'trip_id,stop_id,n\nA,s1,1\nA,s2,2\nB,"s,3",3\nB,s4,4\r\nB,s5,5\n\nC,s6,6\nB,s7,7\n"B",s8,8\nA,s9,9';
  const KEEP = new Set(['A', 'C']);

  it('passes over the rows of refused groups, wherever the text is cut', async () => {
    const all = oracle(TEXT);
    const want = [all[0], ...all.slice(1).filter((r) => KEEP.has(r[0]))];
    // physical lines of the kept rows, counted by hand from TEXT (line 7 is blank)
    const wantLines = [2, 3, 8, 11];
    const bytes = Buffer.from(TEXT, 'utf8');
    for (let cut = 0; cut <= bytes.length; cut++) {
      const got = await oursGrouped([bytes.subarray(0, cut), bytes.subarray(cut)], 'trip_id', (v) => KEEP.has(v));
      expect(got.records, `cut at ${cut}`).toEqual(want);
      expect(got.lines, `cut at ${cut}`).toEqual(wantLines);
      expect(got.asked, `cut at ${cut}`).toEqual(['A', 'B', 'C', 'B', 'A']);
      expect(got.count, `cut at ${cut}`).toBe(all.length - 1);
    }
  });

  it('with the key in a later column, by the same rule', async () => {
    const text = 'n,trip_id\n1,A\n2,B\n3,B\n4,A\n';
    const got = await oursGrouped([text], 'trip_id', (v) => v === 'A');
    expect(got.records).toEqual([
      ['n', 'trip_id'],
      ['1', 'A'],
      ['4', 'A'],
    ]);
    expect(got.asked).toEqual(['A', 'B', 'A']);
    expect(got.count).toBe(4);
  });

  it('on random grouped tables in random chunks', async () => {
    const key = fc.constantFrom('T1', 'T2', 'T10', 'T1x', '"T1"', ' T2');
    const cell = fc.oneof(
      fc.stringMatching(/^[a-z0-9]{0,6}$/),
      fc.stringMatching(/^[a-z,\n ]{0,6}$/).map((s) => `"${s}"`),
    );
    const row = fc.tuple(key, cell, cell).map((r) => r.join(','));
    await fc.assert(
      fc.asyncProperty(fc.array(row, { minLength: 1, maxLength: 30 }), fc.array(fc.nat(400), { maxLength: 4 }), async (rows, cuts) => {
        const text = 'trip_id,b,c\n' + rows.join('\n') + '\n';
        const all = oracle(text);
        const want = [all[0], ...all.slice(1).filter((r) => r[0] === 'T1')];
        const bytes = Buffer.from(text, 'utf8');
        const pieces = cutAt(bytes, cuts);
        const got = await oursGrouped(pieces, 'trip_id', (v) => v === 'T1');
        expect(got.records).toEqual(want);
        expect(got.count).toBe(all.length - 1);
      }),
      { numRuns: 300, seed: 20261202 },
    );
  });
});

describe('the CSV reader agrees with csv-parse', () => {
  for (const [name, text] of Object.entries(CASES)) {
    it(`on ${name}`, async () => {
      const want = oracle(text);
      const got = await ours([text]);
      expect(got.records).toEqual(want);
      // parseCsv uses the same code: same header, rows cut or padded to the header's width
      const sync = parseCsv(text, { file: 't.csv' });
      expect(sync.header).toEqual(want[0]);
      expect(sync.rows).toEqual(want.slice(1).map((r) => Array.from({ length: want[0].length }, (_, k) => r[k] ?? '')));
    });
  }

  it('wherever the text is split into chunks, even inside a UTF-8 sequence or a CRLF', async () => {
    const text = CASES['unicode'] + '"q\r\nq",x\r\n' + CASES['doubled quotes'].slice(4);
    const bytes = Buffer.from(text, 'utf8');
    const want = oracle(text);
    for (let cut = 1; cut < bytes.length; cut++) {
      const got = await ours([bytes.subarray(0, cut), bytes.subarray(cut)]);
      expect(got.records, `cut at byte ${cut}`).toEqual(want);
    }
  });

  it('with records and line numbers right when a record cut at a chunk end holds quoted line breaks', async () => {
    // the record left over from one chunk is finished with the next chunk's text up to its first line
    // break; when that break is inside quotes the reader must go on joining. Records checked against
    // csv-parse [csv-parse, reference library]
    const text = 'a,b,c\n1,"x\ny\nz",3\r\n4,5,6\n"p,\r\nq",,\n7,8,9\n';
    const bytes = Buffer.from(text, 'utf8');
    const want = oracle(text);
    // physical lines where the records start, counted by hand from the text above
    const wantLines = [1, 2, 5, 6, 8];
    expect(want.length).toBe(wantLines.length);
    for (let c1 = 1; c1 < bytes.length; c1++) {
      for (let c2 = c1; c2 < bytes.length; c2 += 3) {
        const got = await ours([bytes.subarray(0, c1), bytes.subarray(c1, c2), bytes.subarray(c2)]);
        expect(got.records, `cuts at ${c1}, ${c2}`).toEqual(want);
        expect(got.lines, `cuts at ${c1}, ${c2}`).toEqual(wantLines);
      }
    }
  });

  it('on random tables with quotes, commas, line breaks and padding, in random chunks', async () => {
    const cell = fc.oneof(
      fc.stringMatching(/^[a-z0-9 .:_-]{0,8}$/).map((s) => s.trim()),
      fc.stringMatching(/^[a-z,"\n\r ]{0,8}$/).map((s) => `"${s.replace(/"/g, '""')}"`),
      fc.stringMatching(/^[a-z0-9]{1,5}$/).map((s) => `  ${s} `),
    );
    const table = fc.array(fc.array(cell, { minLength: 3, maxLength: 3 }), { minLength: 1, maxLength: 12 });
    await fc.assert(
      fc.asyncProperty(table, fc.array(fc.nat(200), { maxLength: 5 }), fc.boolean(), async (rows, cuts, crlf) => {
        const text = 'h1,h2,h3' + (crlf ? '\r\n' : '\n') + rows.map((r) => r.join(',')).join(crlf ? '\r\n' : '\n') + '\n';
        const want = oracle(text).filter((r) => !(r.length === 1 && r[0] === '')); // whitespace-only lines are blank lines to us
        const bytes = Buffer.from(text, 'utf8');
        const pieces = cutAt(bytes, cuts);
        const got = await ours(pieces);
        expect(got.records).toEqual(want);
      }),
      { numRuns: 300, seed: 20261201 },
    );
  });
});

describe('the CSV reader reports where each record starts', () => {
  it('as the physical line, counting blank lines and line breaks inside quotes', () => {
    const r = parseCsv('a,b\n\n1,"two\nlines"\n3,4\r\n\r\n5,6\n', { file: 't.csv' });
    expect(r.rows).toEqual([
      ['1', 'two\nlines'],
      ['3', '4'],
      ['5', '6'],
    ]);
    expect(r.lines).toEqual([3, 5, 7]);
  });

  it('and the line numbers agree with csv-parse for records without embedded line breaks', () => {
    const text = 'a,b\n1,2\n\n3,4\n\n\n5,6\n';
    const info = parse(text, { ...ORACLE, info: true }) as unknown as Array<{ info: { lines: number } }>;
    const r = parseCsv(text, { file: 't.csv' });
    expect(r.lines).toEqual(info.slice(1).map((x) => x.info.lines));
  });
});

describe('the CSV reader counts what it forgives', () => {
  it('padded values, short and long rows', () => {
    const w = new WarningSink();
    parseCsv('a,b\n 1 ,2\n3\n4,5,6\n', { file: 'x.txt', warnings: w });
    const byCode = Object.fromEntries(w.list().map((x) => [x.code, x]));
    expect(byCode['padded-values'].count).toBe(1);
    expect(byCode['padded-values'].examples[0]).toBe('x.txt:2 column a');
    expect(byCode['short-rows'].count).toBe(1);
    expect(byCode['long-rows'].count).toBe(1);
  });

  it('a quote inside an unquoted value: literal, as csv-parse reads it with relax_quotes, and counted', () => {
    const text = 'stop_id,stop_desc\nS1,5" kerb\nS2,"ok"\n';
    const w = new WarningSink();
    const r = parseCsv(text, { file: 'stops.txt', warnings: w });
    expect([r.header, ...r.rows]).toEqual(parse(text, { ...ORACLE, relax_quotes: true }));
    expect(w.list().find((x) => x.code === 'stray-quotes')).toMatchObject({ count: 1, examples: ['stops.txt:2 column stop_desc'] });
  });

  it('invalid UTF-8: replaced with U+FFFD as the WHATWG decoder does, counted and located', async () => {
    const bytes = Buffer.concat([Buffer.from('stop_id,stop_name\nS1,Caf'), Buffer.from([0xe9]), Buffer.from('\nS2,ok\n')]);
    const w = new WarningSink();
    const rows: string[][] = [];
    await readCsv([bytes], { file: 'stops.txt', warnings: w, onHeader: () => {}, onRow: (r) => rows.push(r.toArray()) });
    // reference: the WHATWG Encoding Standard's UTF-8 decoder (TextDecoder, non-fatal) [C]
    const whatwg = new TextDecoder('utf-8').decode(bytes);
    expect(rows[0][1]).toBe(whatwg.split('\n')[1].split(',')[1]);
    expect(rows[0][1]).toBe('Caf\ufffd');
    const inv = w.list().find((x) => x.code === 'invalid-utf8')!;
    expect(inv.count).toBe(1);
    expect(inv.examples[0]).toBe('stops.txt:2 column stop_name');
  });
});

describe('the CSV reader refuses', () => {
  it('an unterminated quote, naming file, line and column', async () => {
    const e = await rejected(ours(['trip_id,trip_headsign\nT1,"Harbour\nT2,Mill\n'], 'trips.txt'));
    expect(e.code).toBe('csv-syntax');
    expect(e.context).toMatchObject({ file: 'trips.txt', line: 2, column: 'trip_headsign' });
    expect(e.oneLine()).toBe('trips.txt:2 column trip_headsign: unterminated quoted field');
  });

  it('a NUL byte, naming file, line and column', () => {
    const e = thrown(() => parseCsv('route_id,route_long_name\nR1,ok\nR2,Ha\0rbour\n', { file: 'routes.txt' }));
    expect(e.code).toBe('csv-syntax');
    expect(e.context).toMatchObject({ file: 'routes.txt', line: 3, column: 'route_long_name' });
  });

  it('a duplicate header name', () => {
    const e = thrown(() => parseCsv('stop_id,stop_name,stop_name\nS1,a,b\n', { file: 'stops.txt' }));
    expect(e.code).toBe('csv-syntax');
    expect(e.context).toMatchObject({ file: 'stops.txt', line: 1, column: 'stop_name' });
  });

  it('a record longer than the cap, whole or arriving in pieces', async () => {
    const long = 'x'.repeat(3000);
    const e1 = thrown(() => parseCsv(`a,b\n1,2\n3,${long}\n`, { file: 'stops.txt', maxRecordChars: 1000 }));
    expect(e1.code).toBe('csv-syntax');
    expect(e1.context).toMatchObject({ file: 'stops.txt', line: 3 });
    const e2 = await rejected(
      readCsv(
        ['a,b\n1,2\n3,', long.slice(0, 1500), long.slice(1500), '\n'].map((s) => Buffer.from(s)),
        {
          file: 'stops.txt',
          maxRecordChars: 1000,
          onHeader: () => {},
          onRow: () => {},
        },
      ),
    );
    expect(e2.code).toBe('csv-syntax');
    expect(e2.context).toMatchObject({ file: 'stops.txt', line: 3 });
    expect(e2.message).toContain('1000');
  });

  it('text after a closing quote', () => {
    const e = thrown(() => parseCsv('a,b\n"x"y,2\n', { file: 't.txt' }));
    expect(e.code).toBe('csv-syntax');
    expect(e.context).toMatchObject({ file: 't.txt', line: 2, column: 'a' });
  });
});

describe('the CSV reader says where and what, whatever the text', () => {
  // a quoted trip_headsign spanning lines 2-4, with a NUL on its third line; csv-parse (an outside reader)
  // agrees that the record starts on line 2 and that the field is the third
  const text = 'trip_id,route_id,trip_headsign,shape_id\nT1,R1,"Harbour\nvia ""Mill""\nand Qu\0ay",SH1\nT2,R1,x,SH1\n';

  it('a NUL inside a quoted field spanning lines: its own line and its field, whole or in pieces', async () => {
    // csv-parse reads the headsign as the third field, starting on line 2 with two line breaks before "Quay": line 4 [D]
    expect((parse(text.replace('\0', ''), { columns: true }) as Record<string, string>[])[0].trip_headsign).toBe(
      'Harbour\nvia "Mill"\nand Quay',
    );
    const e = thrown(() => parseCsv(text, { file: 'trips.txt' }));
    expect(e.context).toMatchObject({ file: 'trips.txt', line: 4, column: 'trip_headsign' });
    for (const cut of [30, 45, 50, 60]) {
      const e2 = await rejected(ours([text.slice(0, cut), text.slice(cut)], 'trips.txt'));
      expect(e2.context, `cut at ${cut}`).toMatchObject({ file: 'trips.txt', line: 4, column: 'trip_headsign' });
    }
    // a NUL after a quoted field that holds a doubled quote and a comma: the field after it
    const e3 = thrown(() => parseCsv('a,b,c\n1,"x"",\ny",3\0\n', { file: 'f.txt' }));
    expect(e3.context).toMatchObject({ line: 3, column: 'c' });
  });

  it('UTF-16 text, with a byte-order mark or without: "UTF-16", not a NUL byte', async () => {
    const table = 'stop_id,stop_name\nS1,Harbour\n';
    const le = Buffer.from(table, 'utf16le'); // [C] Node's Buffer encodes UTF-16LE; the BOMs are the Unicode standard's FF FE / FE FF
    const be = Buffer.from(le).swap16();
    for (const bytes of [Buffer.concat([Buffer.from([0xff, 0xfe]), le]), Buffer.concat([Buffer.from([0xfe, 0xff]), be]), le, be]) {
      const e = await rejected(ours([bytes], 'stops.txt'));
      expect(e.code).toBe('csv-syntax');
      expect(e.oneLine()).toBe('stops.txt:1: the file is UTF-16; GTFS files must be UTF-8');
    }
    // decoded already (a data file read as UTF-8 text)
    expect(thrown(() => parseCsv(le.toString('utf8'), { file: 'r.csv' })).message).toContain('UTF-16');
    // a stray NUL in UTF-8 text is still a NUL byte
    expect(thrown(() => parseCsv('a,b\n1,2\0\n', { file: 'r.csv' })).message).toBe('NUL byte in the CSV text');
  });
});

describe('the CSV reader over a Node stream', () => {
  const table = 'id,name\n' + Array.from({ length: 3000 }, (_, k) => `s${k},"Stop ${k}, north"\n`).join('');

  /** A Readable holding the table in `pieces` chunks, all pushed before anyone reads (a deep read-ahead). */
  function buffered(pieces: number): Readable {
    const r = new Readable({ read() {}, highWaterMark: 1 << 30 });
    const b = Buffer.from(table);
    const step = Math.ceil(b.length / pieces);
    for (let a = 0; a < b.length; a += step) r.push(b.subarray(a, a + step));
    r.push(null);
    return r;
  }

  it('reads every record csv-parse reads when the whole table is already buffered, chunk by chunk', async () => {
    const rows: string[][] = [];
    const seen: number[] = [];
    let header: string[] = [];
    await readCsv(buffered(40), {
      file: 't.csv',
      onHeader: (h) => (header = h),
      onRow: (r) => rows.push(r.toArray()),
      onBytes: (n) => seen.push(n),
    });
    expect([header, ...rows]).toEqual(oracle(table)); // csv-parse, the reference reader
    expect(seen[seen.length - 1]).toBe(Buffer.byteLength(table));
  });

  it('lets the event loop turn between buffered chunks (inflating is handed on by callbacks there)', async () => {
    let rows = 0;
    let rowsWhenLoopTurned = -1;
    setImmediate(() => (rowsWhenLoopTurned = rows));
    await readCsv(buffered(40), { file: 't.csv', onHeader: () => {}, onRow: () => rows++ });
    expect(rows).toBe(3000);
    // the immediate ran while the table was being read, not after the last chunk
    expect(rowsWhenLoopTurned).toBeGreaterThan(0);
    expect(rowsWhenLoopTurned).toBeLessThan(3000);
  });

  it("rejects with the stream's error, whether it comes while reading or came before", async () => {
    const late = new Readable({ read() {} });
    late.push('id,name\ns1,a\n');
    setTimeout(() => late.destroy(new Error('disk gone')), 5);
    await expect(readCsv(late, { file: 't.csv', onHeader: () => {}, onRow: () => {} })).rejects.toThrow('disk gone');
    const early = new Readable({ read() {} });
    early.on('error', () => {});
    early.destroy(new Error('failed first'));
    await new Promise((r) => setImmediate(r));
    await expect(readCsv(early, { file: 't.csv', onHeader: () => {}, onRow: () => {} })).rejects.toThrow('failed first');
  });

  it('rejects when the stream closes before its end, and stops the stream when a row is refused', async () => {
    const cut = new Readable({ read() {} });
    cut.push('id,name\ns1,a\n');
    setTimeout(() => cut.destroy(), 5);
    await expect(readCsv(cut, { file: 't.csv', onHeader: () => {}, onRow: () => {} })).rejects.toThrow(/Premature close/);
    const src = buffered(40);
    let rows = 0;
    const e = await rejected(
      readCsv(src, {
        file: 't.csv',
        onHeader: () => {},
        onRow: (r) => {
          if (++rows === 10) throw new StopspanError('bad-value', 'refused', { file: 't.csv', line: r.line });
        },
      }),
    );
    expect(e.context).toMatchObject({ file: 't.csv', line: 11 });
    expect(src.destroyed).toBe(true);
  });
});

const FEEDS = process.env.STOPSPAN_FEEDS ?? join(import.meta.dirname, '..', '..', '..', 'shared', 'feeds');
const HAVE_FEEDS = existsSync(join(FEEDS, 'nyct-bus-manhattan.zip'));
if (!HAVE_FEEDS) console.warn(`real feeds not found at ${FEEDS}: skipping the real-feed CSV comparisons`);

/** sha256 over records (fields joined by U+0001, records ended by U+0002) plus every 997th record kept. */
class RecordDigest {
  private h = createHash('sha256');
  count = 0;
  sample: string[][] = [];
  add(rec: string[]): void {
    this.h.update(rec.join('\u0001') + '\u0002');
    if (this.count % 997 === 0) this.sample.push(rec);
    this.count++;
  }
  digest(): string {
    return this.h.digest('hex');
  }
}

describe.skipIf(!HAVE_FEEDS)('the CSV reader agrees with csv-parse on every table of the real feeds', () => {
  for (const feed of ['lirr-rail.zip', 'nyct-subway.zip', 'nyct-bus-manhattan.zip']) {
    it(`record for record in ${feed}`, async () => {
      const archive = await openFeed(join(FEEDS, feed));
      try {
        for (const name of archive.names()) {
          const ref = new RecordDigest();
          const parser = (await archive.open(name)).pipe(parseStream(ORACLE));
          for await (const rec of parser) ref.add(rec as string[]);
          const mine = new RecordDigest();
          await readCsv(await archive.open(name), {
            file: name,
            onHeader: (h) => mine.add(h),
            onRow: (row) => mine.add(row.toArray()),
          });
          expect(mine.count, `${feed} ${name} records`).toBe(ref.count);
          expect(mine.sample, `${feed} ${name} sample`).toEqual(ref.sample);
          expect(mine.digest(), `${feed} ${name} every record`).toBe(ref.digest());
        }
      } finally {
        await archive.close();
      }
    });
  }

  it('and the Manhattan stop_times.txt has the row count the feeds README gives', async () => {
    // feeds README: nyct-bus-manhattan.zip has 1 174 914 stop_times rows [C, shared/feeds/README.md]
    const archive = await openFeed(join(FEEDS, 'nyct-bus-manhattan.zip'));
    try {
      const stats = await readCsv(await archive.open('stop_times.txt'), { file: 'stop_times.txt', onHeader: () => {}, onRow: () => {} });
      expect(stats.records).toBe(1_174_914);
    } finally {
      await archive.close();
    }
  });
});

describe('the CSV reader caps a value', () => {
  it(`refusing one of more than ${MAX_FIELD_CHARS} characters, quoted or not, naming file, line and column`, () => {
    const over = 'n'.repeat(MAX_FIELD_CHARS + 1);
    for (const field of [over, `"${over}"`]) {
      const e = thrown(() => parseCsv(`stop_id,stop_name\nS1,Mill Lane\nS2,${field}\n`, { file: 'stops.txt' }));
      expect(e.code).toBe('feed-too-large');
      expect(e.context).toMatchObject({ file: 'stops.txt', line: 3, column: 'stop_name' });
      expect(e.oneLine().length).toBeLessThan(200);
    }
    const at = 'n'.repeat(MAX_FIELD_CHARS);
    expect(parseCsv(`stop_id,stop_name\nS1,${at}\n`, { file: 'stops.txt' }).rows[0][1]).toBe(at);
  });
});
