// Opening feeds: zips (nested folder, unsafe paths, corrupt, truncated, lying sizes, inflation caps),
// folders, and bad paths. Zips are built with yazl (an independent writer) and damaged byte by byte.

import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { crc32 } from 'node:zlib';
import { createHash } from 'node:crypto';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeZip, zipBytes, zipDirectory } from '../helpers/zip.js';
import { WarningSink } from '../../src/common/warnings.js';
import { fileSha256, openFeed } from '../../src/gtfs/archive.js';
import { readFeed } from '../../src/gtfs/readFeed.js';
import { BASIC, cleanupCopies, zipFolder } from './feedCopy.js';
import { rejected } from '../helpers/errors.js';
import { tempDir } from '../helpers/tempDir.js';

afterAll(cleanupCopies);

async function drain(stream: AsyncIterable<Buffer>): Promise<number> {
  let n = 0;
  for await (const c of stream) n += c.length;
  return n;
}

const tmp = tempDir('stopspan-archive-test-');

/** Replaces every occurrence of a byte string (same length) in a file. */
function patchBytes(path: string, from: string, to: string): void {
  expect(to.length).toBe(from.length);
  const buf = readFileSync(path);
  let at = buf.indexOf(from);
  expect(at).toBeGreaterThanOrEqual(0);
  while (at >= 0) {
    buf.write(to, at, 'latin1');
    at = buf.indexOf(from, at + 1);
  }
  writeFileSync(path, buf);
}

/**
 * Offsets of the zip headers of one kind that name `name` [C, PKWARE APPNOTE 4.3.7 and 4.3.12]: local file
 * headers (signature 0x04034b50, name length at +26, name at +30) or central directory headers (signature
 * 0x02014b50, name length at +28, name at +46).
 */
function headersNaming(buf: Buffer, kind: 'local' | 'central', name: string): number[] {
  const sig = Buffer.from(kind === 'local' ? [0x50, 0x4b, 0x03, 0x04] : [0x50, 0x4b, 0x01, 0x02]);
  const [lenAt, nameAt] = kind === 'local' ? [26, 30] : [28, 46];
  const out: number[] = [];
  for (let p = buf.indexOf(sig); p >= 0; p = buf.indexOf(sig, p + 4)) {
    const n = buf.readUInt16LE(p + lenAt);
    if (buf.toString('latin1', p + nameAt, p + nameAt + n) === name) out.push(p);
  }
  return out;
}

/** Writes a damaged zip and reads it: the feed-unreadable error, checked to name stop_times.txt on one line. */
async function refusedOnStopTimes(bytes: Buffer, fileName: string) {
  const path = join(tmp, fileName);
  writeFileSync(path, bytes);
  const e = await rejected(readFeed(path));
  expect(e.code).toBe('feed-unreadable');
  expect(e.context.file).toContain('stop_times.txt');
  expect(e.oneLine()).not.toContain('\n');
  return e;
}

describe('openFeed on zips', () => {
  it('reads tables from one nested subfolder exactly as from the root', async () => {
    const flat = await readFeed(await zipFolder(BASIC));
    const nested = await readFeed(await zipFolder(BASIC, { prefix: 'vellmoor-gtfs/' }));
    expect({ ...nested, source: '', contentHash: '' }).toEqual({ ...flat, source: '', contentHash: '' });
  });

  it('ignores entries with ../ or absolute paths and counts them', async () => {
    // yazl refuses such names, so write harmless ones of the same length and rewrite the bytes
    const zip = await zipFolder(BASIC, { extra: { 'QQ/stops.txt': 'stop_id\nEVIL\n', 'Qtrips.txt': 'x\n' } });
    patchBytes(zip, 'QQ/stops.txt', '../stops.txt');
    patchBytes(zip, 'Qtrips.txt', '/trips.txt');
    const w = new WarningSink();
    const archive = await openFeed(zip, { warnings: w });
    expect(archive.names()).toEqual([
      'agency.txt',
      'calendar.txt',
      'calendar_dates.txt',
      'feed_info.txt',
      'frequencies.txt',
      'routes.txt',
      'shapes.txt',
      'stop_times.txt',
      'stops.txt',
      'trips.txt',
    ]);
    await archive.close();
    const unsafe = w.list().find((x) => x.code === 'unsafe-zip-path')!;
    expect(unsafe.count).toBe(2);
    expect(unsafe.examples.sort()).toEqual(['../stops.txt', '/trips.txt']);
    const feed = await readFeed(zip);
    expect(feed.stopIndex.has('EVIL')).toBe(false);
  });

  it('refuses a truncated or corrupt zip with one line naming the file', async () => {
    const zip = await zipFolder(BASIC);
    const bytes = readFileSync(zip);
    const cut = join(tmp, 'cut.zip');
    writeFileSync(cut, bytes.subarray(0, Math.floor(bytes.length / 2)));
    const e = await rejected(readFeed(cut));
    expect(e.code).toBe('feed-unreadable');
    expect(e.context.file).toBe(cut);
    expect(e.oneLine()).not.toContain('\n');
    const text = join(tmp, 'notes.zip');
    writeFileSync(text, 'these are not the tables you are looking for\n');
    expect((await rejected(readFeed(text))).code).toBe('feed-unreadable');
  });

  it('refuses an entry whose inflated size differs from the size it declares', async () => {
    const zip = await zipFolder(BASIC);
    const buf = readFileSync(zip);
    // central directory header: signature 0x02014b50, uncompressed size at +24, name length at +28, name at +46 [C, PKWARE APPNOTE 4.3.12]
    for (
      let p = buf.indexOf(Buffer.from([0x50, 0x4b, 0x01, 0x02]));
      p >= 0;
      p = buf.indexOf(Buffer.from([0x50, 0x4b, 0x01, 0x02]), p + 4)
    ) {
      const name = buf.toString('latin1', p + 46, p + 46 + buf.readUInt16LE(p + 28));
      if (name === 'agency.txt') buf.writeUInt32LE(10, p + 24);
    }
    const lying = join(tmp, 'lying.zip');
    writeFileSync(lying, buf);
    const e = await rejected(readFeed(lying));
    expect(e.code).toBe('feed-unreadable');
    expect(e.context.file).toContain('agency.txt');
  });

  it('refuses an entry whose deflated body is damaged, naming the entry', async () => {
    const zip = await zipFolder(BASIC);
    const buf = readFileSync(zip);
    // local file header: compressed size at +18, name length at +26, extra length at +28, data after the
    // name (at +30) and the extra field [C, PKWARE APPNOTE 4.3.7]
    const at = headersNaming(buf, 'local', 'stop_times.txt');
    expect(at.length).toBeGreaterThan(0);
    for (const p of at) {
      const data = p + 30 + buf.readUInt16LE(p + 26) + buf.readUInt16LE(p + 28);
      const size = buf.readUInt32LE(p + 18);
      expect(buf.readUInt16LE(p + 8)).toBe(8); // deflated
      for (let k = data + 2; k < data + size - 2; k += 3) buf[k] ^= 0x5a;
    }
    await refusedOnStopTimes(buf, 'damaged.zip');
  });

  it('refuses a deflated entry marked encrypted, or whose local header points past the end of the file', async () => {
    // central directory header: flags at +8, whose bit 0 marks encryption [C, PKWARE APPNOTE 4.3.12, 4.4.4]
    const zip = await zipFolder(BASIC);
    const enc = readFileSync(zip);
    const central = headersNaming(enc, 'central', 'stop_times.txt');
    expect(central.length).toBe(1);
    for (const p of central) enc.writeUInt16LE(enc.readUInt16LE(p + 8) | 1, p + 8);
    expect((await refusedOnStopTimes(enc, 'encrypted.zip')).oneLine()).toContain('encrypted');

    // local file header: extra field length at +28 [C, PKWARE APPNOTE 4.3.7]; 0xffff puts the body past the end
    const far = readFileSync(zip);
    for (const p of headersNaming(far, 'local', 'stop_times.txt')) far.writeUInt16LE(0xffff, p + 28);
    await refusedOnStopTimes(far, 'overflow.zip');
  });

  it('reads stored (uncompressed) entries as it reads deflated ones', async () => {
    const stored = join(tmp, 'stored.zip');
    await writeZip(
      stored,
      readdirSync(BASIC)
        .filter((n) => n.endsWith('.txt'))
        .map((f) => [f, readFileSync(join(BASIC, f))] as const),
      { compress: false },
    );
    const a = await readFeed(stored);
    const b = await readFeed(await zipFolder(BASIC));
    expect(a.rowCounts).toEqual(b.rowCounts);
    expect([...a.stopTimes.keys()]).toEqual([...b.stopTimes.keys()]);
  });

  it('refuses absurd declared sizes and compression ratios, and caps inflated bytes while streaming', async () => {
    const lines: string[] = [];
    for (let k = 0, len = 0; len < 2 * 1024 * 1024; k++) {
      const line = `T${k % 50},08:${String(k % 60).padStart(2, '0')}:00,S${k % 9},${k}\n`;
      lines.push(line);
      len += line.length;
    }
    const zip = await zipFolder(BASIC, { extra: { 'big.txt': lines.join('') } });
    const archive = await openFeed(zip);
    const size = archive.size('big.txt')!;
    expect(size).toBeGreaterThan(2 * 1024 * 1024);
    expect(await drain(await archive.open('big.txt'))).toBe(size); // under the default caps it reads whole
    await archive.close();

    const ratio = await openFeed(zip, { limits: { maxRatio: 5 } });
    const e1 = await rejected(ratio.open('big.txt'));
    expect(e1.code).toBe('feed-too-large');
    expect(e1.context.file).toBe('big.txt');
    expect(e1.message).toContain('ratio');
    await ratio.close();

    const declared = await openFeed(zip, { limits: { maxEntryBytes: 1024 * 1024 } });
    const e2 = await rejected(declared.open('big.txt'));
    expect(e2.code).toBe('feed-too-large');
    expect(e2.message).toContain('declared size');
    await declared.close();

    // the total cap counts inflated bytes over every entry read: the small tables pass, big.txt does not
    const small = archive.names().filter((n) => n !== 'big.txt');
    const smallBytes = small.reduce((a, n) => a + archive.size(n)!, 0);
    const total = await openFeed(zip, { limits: { maxTotalBytes: smallBytes + 1000 } });
    for (const n of small) await drain(await total.open(n));
    const e3 = await rejected(drain(await total.open('big.txt')));
    expect(e3.code).toBe('feed-too-large');
    expect(e3.message).toContain(`total cap of ${smallBytes + 1000}`);
    await total.close();
  });
});

describe('openFeed on zips that lie or are damaged', () => {
  /** The basic feed's tables as name and bytes, in folder order. */
  const basicTables = (): [string, Buffer][] =>
    readdirSync(BASIC)
      .filter((n) => n.endsWith('.txt'))
      .map((f) => [f, readFileSync(join(BASIC, f))]);

  /** A zip of the basic feed with stop_times.txt stored (not deflated), so its bytes can be edited in place. */
  async function storedZip(): Promise<Buffer> {
    return zipBytes(basicTables(), { compress: false });
  }

  it('refuses an entry whose CRC-32 does not match, naming it: one flipped digit is not read as a time', async () => {
    const buf = await storedZip();
    const text = readFileSync(join(BASIC, 'stop_times.txt'), 'latin1');
    const m = /\d\d:\d\d:\d\d/.exec(text.split('\n')[1])!;
    const at = buf.indexOf(text.slice(0, 200), 0, 'latin1') + text.indexOf('\n') + 1 + m.index + 1;
    expect(at).toBeGreaterThan(100);
    buf[at] = buf[at] === 0x30 ? 0x31 : 0x30; // one digit of the first time, still a valid time
    const e = await refusedOnStopTimes(buf, 'flipped.zip');
    expect(e.message).toContain('CRC-32');
  });

  it('refuses an entry as soon as it inflates past a small declared size, not at its end', async () => {
    const big = Buffer.alloc(24 * 1024 * 1024, 'abcdefghij\n'); // 24 MiB, about 1000:1 deflated
    const zip = await zipFolder(BASIC, { extra: { 'big.txt': big } });
    const buf = readFileSync(zip);
    // uncompressed size: local header +22, central header +24 [C, PKWARE APPNOTE 4.3.7 and 4.3.12]
    for (const p of headersNaming(buf, 'local', 'big.txt')) buf.writeUInt32LE(1000, p + 22);
    for (const p of headersNaming(buf, 'central', 'big.txt')) buf.writeUInt32LE(1000, p + 24);
    const path = join(tmp, 'small-declared.zip');
    writeFileSync(path, buf);
    const archive = await openFeed(path);
    let seen = 0;
    const e = await rejected(
      (async () => {
        for await (const c of await archive.open('big.txt')) seen += (c as Buffer).length;
      })(),
    );
    await archive.close();
    expect(e.code).toBe('feed-unreadable');
    expect(e.context.file).toContain('big.txt');
    expect(e.message).toContain('declares');
    expect(seen).toBeLessThanOrEqual(1000); // nothing past the declared size reached the reader
  });

  it('refuses two entries of one table name, naming it', async () => {
    const path = join(tmp, 'twice.zip');
    await writeZip(path, [...basicTables(), ['stops.txt', 'stop_id,stop_name,stop_lat,stop_lon\nX,Elsewhere,0,0\n']]);
    const e = await rejected(openFeed(path));
    expect(e.code).toBe('feed-unreadable');
    expect(e.context.file).toContain('stops.txt');
    expect(e.message).toContain('two entries');
  });

  it('refuses an archive listing more entries than the cap before listing them', async () => {
    const path = join(tmp, 'many.zip');
    const empties: [string, Buffer][] = Array.from({ length: 12_000 }, (_, k) => [`e/${k}`, Buffer.alloc(0)]);
    await writeZip(path, [...basicTables(), ...empties], { compress: false });
    const e = await rejected(openFeed(path));
    expect(e.code).toBe('feed-too-large');
    expect(e.message).toContain('10000');
    const w = await openFeed(path, { limits: { maxEntries: 20_000 } });
    expect(w.has('stops.txt')).toBe(true);
    await w.close();
  });
});

describe('the hash of a feed file', () => {
  it('is SHA-256, the same whether the file is hashed whole or streamed', async () => {
    const dir = tempDir('stopspan-hash-');
    const abc = join(dir, 'abc.bin');
    writeFileSync(abc, 'abc');
    // FIPS 180-2, appendix B.1: SHA-256("abc")
    const ABC = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';
    expect(await fileSha256(abc)).toBe(ABC);
    expect(await fileSha256(abc, 0)).toBe(ABC);
    // a file of several 1 MiB pieces, streamed (limit 0) and whole
    const big = join(dir, 'big.bin');
    writeFileSync(big, Buffer.from(Array.from({ length: (3 << 20) + 17 }, (_, k) => (k * 131) & 255)));
    const ref = createHash('sha256').update(readFileSync(big)).digest('hex'); // node's own hash, one shot
    expect(await fileSha256(big, 0)).toBe(ref);
    expect(await fileSha256(big)).toBe(ref);
  });
});

describe('openFeed on paths', () => {
  it('refuses a missing path, an empty file and a folder without tables', async () => {
    const missing = await rejected(readFeed(join(tmp, 'no-such-feed.zip')));
    expect(missing.code).toBe('feed-unreadable');
    expect(missing.oneLine()).toBe(`${join(tmp, 'no-such-feed.zip')}: cannot read the feed: no such file or folder`);
    const empty = join(tmp, 'empty.zip');
    writeFileSync(empty, '');
    const e = await rejected(readFeed(empty));
    expect(e.code).toBe('feed-unreadable');
    expect(e.message).toContain('empty');
    const bare = mkdtempSync(join(tmp, 'bare-'));
    const m = await rejected(readFeed(bare));
    expect(m.code).toBe('missing-table');
  });

  it('lists only .txt files of a folder', async () => {
    const archive = await openFeed(BASIC);
    expect(archive.names()).not.toContain('README.md');
    expect(archive.size('agency.txt')).toBe(readFileSync(join(BASIC, 'agency.txt')).length);
    await archive.close();
  });
});

const FEEDS = process.env.STOPSPAN_FEEDS ?? join(import.meta.dirname, '..', '..', '..', 'shared', 'feeds');
const HAVE_FEEDS = existsSync(join(FEEDS, 'lirr-rail.zip'));

describe.skipIf(!HAVE_FEEDS)('inflating the real feeds', () => {
  it('gives every table the CRC-32 and size its zip directory records', async () => {
    // the CRC-32 of each entry's uncompressed bytes, as the writer of the zip computed it, read from the
    // central directory by yauzl and recomputed with zlib's crc32 [C, PKWARE APPNOTE 4.4.7]
    const path = join(FEEDS, 'lirr-rail.zip');
    const want = new Map([...(await zipDirectory(path))].map(([name, r]) => [name, { crc: r.crc32, size: r.uncompressedSize }]));
    const archive = await openFeed(path);
    try {
      expect(archive.names().length).toBeGreaterThan(5);
      for (const name of archive.names()) {
        let crc = 0;
        let size = 0;
        for await (const c of await archive.open(name)) {
          crc = crc32(c as Buffer, crc);
          size += (c as Buffer).length;
        }
        expect({ crc, size }, name).toEqual(want.get(name));
      }
    } finally {
      await archive.close();
    }
  });
});
