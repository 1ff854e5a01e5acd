// Property-based fuzz of the archive layer: the minimal corpus feed as a zip (fixtures/broken/minimal.zip)
// with bytes overwritten, a run of bytes zeroed, or the file cut short, at positions fast-check chooses
// (biased towards the headers and the central directory, where the zip reader decides what to trust).
// Every damaged archive must either audit with a report that agrees with itself or be refused with a
// StopspanError; a crash, an uncaught stream error or a hang is a bug. Seeded like mutate-demo.test.ts:
// STOPSPAN_FUZZ_SEED=<n> replays, STOPSPAN_FUZZ_RUNS=<n> widens the search.

import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import yazl from 'yazl';
import { parse } from 'csv-parse/sync';
import { auditFeed } from '../../src/audit/auditFeed.js';
import { writeReport } from '../../src/report/writeReport.js';
import { isStopspanError } from '../../src/common/errors.js';
import { openFeed } from '../../src/gtfs/archive.js';
import { ROOT } from './demoTables.js';

const SEED = process.env.STOPSPAN_FUZZ_SEED !== undefined ? Number(process.env.STOPSPAN_FUZZ_SEED) : 20261201;
const RUNS = Number(process.env.STOPSPAN_FUZZ_RUNS ?? 200); // a run takes a few milliseconds
const ZIP = readFileSync(join(ROOT, 'fixtures', 'broken', 'minimal.zip'));
console.log(`test/fuzz/zip-bytes.test.ts: seed ${SEED} (replay with STOPSPAN_FUZZ_SEED=${SEED}), ${RUNS} runs`);

type Damage =
  | { kind: 'overwrite'; at: number; bytes: readonly number[] }
  | { kind: 'zero-run'; at: number; length: number }
  | { kind: 'truncate'; at: number };

/** Offsets where zip structures start: local headers (PK\3\4), central records (PK\1\2), the end record (PK\5\6). */
function structureOffsets(zip: Buffer): number[] {
  const out: number[] = [];
  for (let i = zip.indexOf('PK'); i >= 0; i = zip.indexOf('PK', i + 1))
    if ([1, 3, 5].includes(zip[i + 2]) && zip[i + 3] === zip[i + 2] + 1) out.push(i);
  return out;
}
const STRUCTS = structureOffsets(ZIP);

const position = fc.oneof(
  fc.nat({ max: ZIP.length - 1 }),
  // inside the first 46 bytes of a header record: signatures, sizes, offsets, name lengths
  fc.tuple(fc.constantFrom(...STRUCTS), fc.nat({ max: 45 })).map(([s, k]) => Math.min(s + k, ZIP.length - 1)),
);
const damage: fc.Arbitrary<Damage> = fc.oneof(
  fc.record({
    kind: fc.constant('overwrite' as const),
    at: position,
    bytes: fc.array(fc.integer({ min: 0, max: 255 }), { minLength: 1, maxLength: 4 }),
  }),
  fc.record({
    kind: fc.constant('overwrite' as const),
    at: position,
    bytes: fc.constantFrom([0xff, 0xff, 0xff, 0xff], [0, 0, 0, 0], [0xff, 0xff], [0x7f]),
  }),
  fc.record({ kind: fc.constant('zero-run' as const), at: position, length: fc.integer({ min: 1, max: 64 }) }),
  fc.record({ kind: fc.constant('truncate' as const), at: position }),
);

function damaged(ds: Damage[]): Buffer {
  let b = Buffer.from(ZIP);
  for (const d of ds) {
    if (d.kind === 'overwrite') d.bytes.forEach((v, i) => d.at + i < b.length && (b[d.at + i] = v));
    else if (d.kind === 'zero-run') b.fill(0, d.at, Math.min(b.length, d.at + d.length));
    else b = b.subarray(0, Math.max(1, Math.min(d.at, b.length)));
  }
  return b;
}

let work = '';
let k = 0;
const tally = { ok: 0, refused: 0, codes: new Map<string, number>() };
beforeAll(() => {
  work = mkdtempSync(join(tmpdir(), 'stopspan-zipfuzz-'));
});
afterAll(() => {
  if (work) rmSync(work, { recursive: true, force: true });
  console.log(
    `zip fuzz outcome: ${tally.ok} audited, ${tally.refused} refused (${[...tally.codes].map(([c, n]) => `${c} ${n}`).join(', ')})`,
  );
});

describe('the minimal zip with damaged bytes', () => {
  it('finds the zip structures it aims at (7 tables: 7 local headers, 7 central records, 1 end record)', () => {
    expect(STRUCTS.length).toBe(15);
  });

  it(`audits consistently or refuses with a StopspanError (seed ${SEED}, ${RUNS} runs)`, async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(damage, { minLength: 1, maxLength: 3 }), async (ds) => {
        const n = k++;
        const feed = join(work, `feed-${n}.zip`);
        const out = join(work, `out-${n}`);
        writeFileSync(feed, damaged(ds));
        try {
          let result;
          try {
            ({ result } = await auditFeed(feed));
          } catch (e) {
            if (!isStopspanError(e))
              throw new Error(`not a StopspanError after ${JSON.stringify(ds)}: ${(e as Error)?.stack ?? String(e)}`);
            tally.refused++;
            tally.codes.set(e.code, (tally.codes.get(e.code) ?? 0) + 1);
            return;
          }
          await writeReport(result, out);
          // the report agrees with itself: every stop row names a known pattern, gaps are non-negative
          const patterns = parse(readFileSync(join(out, 'patterns.csv')), { columns: true }) as Record<string, string>[];
          const stops = parse(readFileSync(join(out, 'stops.csv')), { columns: true }) as Record<string, string>[];
          const ids = new Set(patterns.map((p) => p.pattern_id));
          for (const s of stops) {
            if (!ids.has(s.pattern_id)) throw new Error(`stop row names unknown pattern ${s.pattern_id} after ${JSON.stringify(ds)}`);
            if (s.gap_before_m !== '' && !(Number(s.gap_before_m) >= 0))
              throw new Error(`gap ${s.gap_before_m} after ${JSON.stringify(ds)}`);
          }
          JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
          tally.ok++;
        } finally {
          rmSync(feed, { force: true });
          rmSync(out, { recursive: true, force: true });
        }
      }),
      { seed: SEED, numRuns: RUNS, path: process.env.STOPSPAN_FUZZ_PATH, endOnFailure: true },
    );
    expect(tally.ok + tally.refused).toBeGreaterThan(0);
  });
});

/** The minimal feed zipped with stop_times.txt stored, and where that entry's bytes lie in the file. */
async function storedStopTimes(): Promise<{ zip: Buffer; start: number; length: number }> {
  const dir = join(ROOT, 'fixtures', 'broken', 'minimal');
  const zip = new yazl.ZipFile();
  for (const f of readdirSync(dir).sort())
    zip.addBuffer(readFileSync(join(dir, f)), f, { compress: f !== 'stop_times.txt', mtime: new Date(Date.UTC(2026, 10, 1)) });
  zip.end();
  const chunks: Buffer[] = [];
  for await (const c of zip.outputStream) chunks.push(c as Buffer);
  const buf = Buffer.concat(chunks);
  const text = readFileSync(join(dir, 'stop_times.txt'));
  const start = buf.indexOf(text);
  return { zip: buf, start, length: text.length };
}

describe('the minimal zip with bytes of a stored table changed', () => {
  it(`is refused as corrupt whenever up to 4 adjacent bytes of the table differ (seed ${SEED}, ${RUNS} runs)`, async () => {
    const { zip, start, length } = await storedStopTimes();
    expect(start).toBeGreaterThan(0);
    // CRC-32 detects every burst of errors up to 32 bits long, so any such change must be caught [M: a
    // property of every degree-32 CRC polynomial, common practice in zip and Ethernet checks]
    await fc.assert(
      fc.asyncProperty(
        fc.nat({ max: length - 4 }),
        fc.array(fc.integer({ min: 1, max: 255 }), { minLength: 1, maxLength: 4 }),
        async (at, xors) => {
          const b = Buffer.from(zip);
          xors.forEach((x, i) => (b[start + at + i] ^= x));
          const path = join(work, `stored-${k++}.zip`);
          writeFileSync(path, b);
          const archive = await openFeed(path);
          try {
            let failed: unknown = null;
            try {
              for await (const chunk of await archive.open('stop_times.txt')) void chunk;
            } catch (e) {
              failed = e;
            }
            if (!isStopspanError(failed) || failed.code !== 'feed-unreadable' || !failed.message.includes('CRC-32')) {
              throw new Error(`changed bytes at ${at} (${JSON.stringify(xors)}) were not refused by the CRC-32: ${String(failed)}`);
            }
          } finally {
            await archive.close();
            rmSync(path, { force: true });
          }
        },
      ),
      { seed: SEED, numRuns: RUNS, endOnFailure: true },
    );
  });
});
