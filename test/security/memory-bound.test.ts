// Memory stays bounded on hostile archives: the built CLI, run with a 256 MB heap, refuses the generated
// zip bomb (about 4 MB inflating to 4 GB of zeros: scripts/make-broken.mjs --large) with exit 2 and one
// line, and so does the same bomb with its declared sizes rewritten to look small, which forces the
// streaming byte cap and the zip reader's size check instead of the up-front ratio check. The 10 MB line
// is refused at the record cap under the same heap, and a feed folder whose stop_times.txt is a link to
// an endless device (/dev/zero, /dev/urandom) ends with exit 2 instead of reading forever. A GTFS-Realtime
// snapshot that is a gzip bomb (512 MiB of zeros in about 0.5 MB) is skipped with a counted warning at
// the realtime reader's 64 MiB snapshot cap, and the audit goes on. The peak resident set of each run is measured by a
// preloaded module and must stay far below what inflating the entry would take.

import { spawnSync } from 'node:child_process';
import { cpSync, createWriteStream, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { createGzip } from 'node:zlib';
import { pipeline } from 'node:stream/promises';
import { Readable } from 'node:stream';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { zipDirectory } from '../helpers/zip.js';
import { ROOT } from '../fuzz/demoTables.js';
import { CLI } from '../helpers/cli.js';

const HEAP_MB = 256;
const haveCli = existsSync(CLI);
if (!haveCli) console.warn(`test/security/memory-bound.test.ts: skipped: ${CLI} is absent (npm run build)`);

let tmp = '';
let preload = '';

beforeAll(() => {
  tmp = mkdtempSync(join(tmpdir(), 'stopspan-membound-'));
  const r = spawnSync(process.execPath, [join(ROOT, 'scripts', 'make-broken.mjs'), '--large', '--out', join(tmp, 'large')], {
    encoding: 'utf8',
  });
  expect(r.status, r.stderr).toBe(0);
  // records the process's peak resident set (KiB) when it exits, however it exits
  preload = join(tmp, 'peak-rss.mjs');
  writeFileSync(
    preload,
    "import { writeFileSync } from 'node:fs';\nprocess.on('exit', () => writeFileSync(process.env.PEAK_RSS_FILE, String(process.resourceUsage().maxRSS)));\n",
  );
});
afterAll(() => {
  if (tmp) rmSync(tmp, { recursive: true, force: true });
});

/** Offsets of one entry's central-directory record and local header, found by walking the central directory. */
function entryHeaders(zip: Buffer, name: string): { central: number; local: number } {
  const eocd = zip.lastIndexOf(Buffer.from([0x50, 0x4b, 0x05, 0x06]));
  let p = zip.readUInt32LE(eocd + 16); // start of the central directory (APPNOTE 4.3.16)
  const n = zip.readUInt16LE(eocd + 10);
  for (let i = 0; i < n; i++) {
    if (zip.readUInt32LE(p) !== 0x02014b50) throw new Error('bad central directory record');
    const nameLen = zip.readUInt16LE(p + 28);
    const extraLen = zip.readUInt16LE(p + 30);
    const commentLen = zip.readUInt16LE(p + 32);
    if (zip.toString('utf8', p + 46, p + 46 + nameLen) === name) return { central: p, local: zip.readUInt32LE(p + 42) };
    p += 46 + nameLen + extraLen + commentLen;
  }
  throw new Error(`${name} not in the zip`);
}

/** The bomb with the entry's uncompressed size declared as `size` in both headers (APPNOTE 4.3.7, 4.3.12). */
function lyingBomb(src: string, dest: string, size: number): void {
  const zip = Buffer.from(readFileSync(src));
  const { central, local } = entryHeaders(zip, 'stop_times.txt');
  zip.writeUInt32LE(size, central + 24);
  zip.writeUInt32LE(size, local + 22);
  writeFileSync(dest, zip);
}

function runSmallHeap(feed: string, label: string, extra: string[] = []) {
  const out = join(tmp, `out-${label}`);
  const rssFile = join(tmp, `rss-${label}`);
  const r = spawnSync(
    process.execPath,
    [`--max-old-space-size=${HEAP_MB}`, '--import', preload, CLI, 'audit', feed, '--out', out, ...extra],
    {
      encoding: 'utf8',
      timeout: 110_000,
      env: { ...process.env, PEAK_RSS_FILE: rssFile },
    },
  );
  const peakMiB = existsSync(rssFile) ? Number(readFileSync(rssFile, 'utf8')) / 1024 : NaN;
  console.log(`memory-bound ${label}: exit ${r.status}, peak RSS ${peakMiB.toFixed(0)} MiB, stderr ${r.stderr.trim()}`);
  return { r, out, peakMiB };
}

function expectRefused({ r, out, peakMiB }: ReturnType<typeof runSmallHeap>, words: string[]): void {
  expect(r.signal, 'killed: hung, or out of memory').toBeNull();
  expect(r.stderr).not.toMatch(/^\s+at /m); // no stack frames
  expect(r.stderr).not.toMatch(/heap out of memory|allocation failed/i);
  expect(r.status, r.stderr).toBe(2);
  const lines = r.stderr.trimEnd().split('\n');
  expect(lines.length, r.stderr).toBe(1);
  expect(lines[0]).toMatch(/^error: /);
  for (const w of words) expect(lines[0]).toContain(w);
  expect(existsSync(out), 'no output folder').toBe(false);
  // inflating the 4 GB entry in memory would need 16 times the heap; a streaming refusal stays near Node's
  // own baseline (measured 63-76 MiB here), well under the heap
  expect(peakMiB).toBeLessThan(200);
}

describe.skipIf(!haveCli)(`hostile archives under a ${HEAP_MB} MB heap (built CLI)`, () => {
  it('refuses the zip bomb with exit 2 and one line', async () => {
    const bomb = join(tmp, 'large', 'zip-bomb.zip');
    expect((await zipDirectory(bomb)).get('stop_times.txt')?.uncompressedSize).toBe(238 * 16 * 1024 * 1024); // read back with yauzl
    expectRefused(runSmallHeap(bomb, 'zip-bomb'), ['stop_times.txt']);
  });

  it('refuses the zip bomb that declares a small size (the streaming caps, not the header, catch it)', async () => {
    const liar = join(tmp, 'lying-bomb.zip');
    lyingBomb(join(tmp, 'large', 'zip-bomb.zip'), liar, 1000);
    expect((await zipDirectory(liar)).get('stop_times.txt')?.uncompressedSize).toBe(1000); // yauzl sees the lie: under the 1 MiB ratio threshold
    expectRefused(runSmallHeap(liar, 'lying-bomb'), ['stop_times.txt']);
  });

  it('refuses the 10 MB line at the record cap', () => {
    expectRefused(runSmallHeap(join(tmp, 'large', 'long-line.zip'), 'long-line'), ['stops.txt']);
  });

  it.each(['/dev/zero', '/dev/urandom'])('ends with exit 2 when a folder table links to %s', (device) => {
    if (!existsSync(device)) return console.warn(`skipped: ${device} is absent`);
    const feed = join(tmp, `linked-${device.replace(/\//g, '_')}`);
    cpSync(join(ROOT, 'fixtures', 'broken', 'minimal'), feed, { recursive: true });
    rmSync(join(feed, 'stop_times.txt'));
    symlinkSync(device, join(feed, 'stop_times.txt'));
    expectRefused(runSmallHeap(feed, `link${device.replace(/\//g, '-')}`), ['stop_times.txt']);
  });

  it('skips a gzip-bomb realtime snapshot with a counted warning, at the 64 MiB snapshot cap', async () => {
    const rt = join(tmp, 'realtime-bomb');
    mkdirSync(rt);
    const MiB = Buffer.alloc(1024 * 1024);
    await pipeline(
      Readable.from(
        (function* () {
          for (let i = 0; i < 512; i++) yield MiB;
        })(),
      ),
      createGzip({ level: 9 }),
      createWriteStream(join(rt, '1793773680.pb.gz')),
    );
    const run = runSmallHeap(join(ROOT, 'fixtures', 'broken', 'minimal'), 'realtime-bomb', ['--observed', rt]);
    expect(run.r.signal).toBeNull();
    expect(run.r.status, run.r.stderr).toBe(0);
    const summary = JSON.parse(readFileSync(join(run.out, 'summary.json'), 'utf8'));
    const w = summary.warnings.find((x: { code: string }) => x.code === 'realtime-undecodable');
    expect(w?.count).toBe(1);
    // the inflated buffer is bounded by the 64 MiB snapshot cap (outside the JS heap)
    expect(run.peakMiB).toBeLessThan(64 + 200);
  });
});
