// Reads an archive of GTFS-Realtime snapshots (a folder or a zip; files in any order, plain or gzip)
// and yields the decoded FULL_DATASET messages one at a time in header.timestamp order, so memory holds
// one snapshot, not the archive. Bad files are counted in the WarningSink and skipped, never fatal.

import { promises as fsp } from 'node:fs';
import * as path from 'node:path';
import { gunzipSync } from 'node:zlib';
import yauzl from 'yauzl';
import GtfsRealtimeBindings from 'gtfs-realtime-bindings';
import { StopspanError } from '../common/errors.js';
import type { OnProgress } from '../common/progress.js';
import { WarningSink } from '../common/warnings.js';

const { transit_realtime } = GtfsRealtimeBindings;
export type FeedMessage = GtfsRealtimeBindings.transit_realtime.FeedMessage;

export interface Snapshot {
  name: string; // file name inside the archive
  timestampS: number; // header.timestamp, POSIX seconds
  message: FeedMessage;
}

export interface ArchiveStats {
  filesSeen: number;
  snapshotsRead: number;
  snapshotsSkipped: number;
}

export interface ReadArchiveOptions {
  warnings?: WarningSink;
  stats?: ArchiveStats;
  onProgress?: OnProgress;
  /** Largest snapshot accepted after inflation, bytes (a bound against gzip bombs). */
  maxSnapshotBytes?: number;
}

interface EntryRef {
  name: string;
  load: () => Promise<Buffer>;
}

interface Indexed {
  ref: EntryRef;
  timestampS: number;
  order: number;
}

const GZIP_MAGIC_0 = 0x1f;
const GZIP_MAGIC_1 = 0x8b;
const ZIP_MAGIC = 0x04034b50;

/** Inflate when the bytes start with the gzip magic (1f 8b), else return them as they are. */
export function maybeGunzip(buf: Buffer, maxBytes: number): Buffer {
  if (buf.length >= 2 && buf[0] === GZIP_MAGIC_0 && buf[1] === GZIP_MAGIC_1) {
    return gunzipSync(buf, { maxOutputLength: maxBytes });
  }
  return buf;
}

function readVarint(buf: Uint8Array, pos: number): [number, number] {
  let result = 0;
  let mul = 1;
  for (let i = 0; i < 10; i++) {
    if (pos >= buf.length) throw new Error('truncated varint');
    const b = buf[pos++];
    result += (b & 0x7f) * mul;
    if ((b & 0x80) === 0) return [result, pos];
    mul *= 128;
  }
  throw new Error('varint too long');
}

/**
 * Walks the top-level protobuf framing of a FeedMessage (checking that every field fits the buffer) and
 * decodes only the header (field 1) with the published bindings. Throws on malformed framing, which
 * catches truncated and non-protobuf files before any full decode.
 */
export function scanHeader(buf: Uint8Array): GtfsRealtimeBindings.transit_realtime.FeedHeader {
  let pos = 0;
  let header: GtfsRealtimeBindings.transit_realtime.FeedHeader | null = null;
  while (pos < buf.length) {
    const [tag, p1] = readVarint(buf, pos);
    pos = p1;
    const field = Math.floor(tag / 8);
    const wire = tag & 7;
    if (field === 0) throw new Error('field number 0');
    if (wire === 0) {
      pos = readVarint(buf, pos)[1];
    } else if (wire === 1) {
      pos += 8;
    } else if (wire === 5) {
      pos += 4;
    } else if (wire === 2) {
      const [len, p2] = readVarint(buf, pos);
      if (p2 + len > buf.length) throw new Error('length-delimited field runs past the end');
      if (field === 1) header = transit_realtime.FeedHeader.decode(buf.subarray(p2, p2 + len));
      pos = p2 + len;
    } else {
      throw new Error(`unsupported wire type ${wire}`);
    }
    if (pos > buf.length) throw new Error('field runs past the end');
  }
  if (!header) throw new Error('no header');
  return header;
}

function toNumber(v: number | { toNumber(): number } | null | undefined): number {
  if (v === null || v === undefined) return 0;
  return typeof v === 'number' ? v : v.toNumber();
}

async function listFolder(root: string): Promise<EntryRef[]> {
  const out: EntryRef[] = [];
  async function walk(dir: string): Promise<void> {
    const items = await fsp.readdir(dir, { withFileTypes: true });
    items.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const it of items) {
      const full = path.join(dir, it.name);
      if (it.isDirectory()) await walk(full);
      else if (it.isFile() && !it.name.startsWith('.')) {
        out.push({ name: path.relative(root, full), load: () => fsp.readFile(full) });
      }
    }
  }
  await walk(root);
  return out;
}

function openZip(file: string): Promise<yauzl.ZipFile> {
  return new Promise((resolve, reject) => {
    yauzl.open(file, { lazyEntries: true, autoClose: false, strictFileNames: false }, (err, zip) => {
      if (err || !zip) reject(err ?? new Error('cannot open zip'));
      else resolve(zip);
    });
  });
}

async function listZip(zip: yauzl.ZipFile, maxBytes: number): Promise<EntryRef[]> {
  const entries: yauzl.Entry[] = await new Promise((resolve, reject) => {
    const acc: yauzl.Entry[] = [];
    zip.on('entry', (e: yauzl.Entry) => {
      if (!e.fileName.endsWith('/')) acc.push(e);
      zip.readEntry();
    });
    zip.on('end', () => resolve(acc));
    zip.on('error', reject);
    zip.readEntry();
  });
  return entries.map((e) => ({
    name: e.fileName,
    load: () =>
      new Promise<Buffer>((resolve, reject) => {
        if (e.uncompressedSize > maxBytes) {
          reject(new Error(`entry declares ${e.uncompressedSize} bytes, above the cap of ${maxBytes}`));
          return;
        }
        zip.openReadStream(e, (err, stream) => {
          if (err || !stream) {
            reject(err ?? new Error('cannot read entry'));
            return;
          }
          const chunks: Buffer[] = [];
          let n = 0;
          stream.on('data', (c: Buffer) => {
            n += c.length;
            if (n > maxBytes) stream.destroy(new Error('entry larger than the cap'));
            else chunks.push(c);
          });
          stream.on('end', () => resolve(Buffer.concat(chunks)));
          stream.on('error', reject);
        });
      }),
  }));
}

async function isZipFile(file: string): Promise<boolean> {
  const fh = await fsp.open(file, 'r');
  try {
    const b = Buffer.alloc(4);
    const { bytesRead } = await fh.read(b, 0, 4, 0);
    return bytesRead === 4 && b.readUInt32LE(0) === ZIP_MAGIC;
  } finally {
    await fh.close();
  }
}

/**
 * Yields the archive's FULL_DATASET snapshots in header.timestamp order (ties by file name), one
 * decoded message at a time. Two passes: the first reads each file's header only, the second decodes
 * each file fully when its turn comes. Skipped (counted in warnings and stats): DIFFERENTIAL snapshots,
 * files that are truncated or not protobuf, snapshots without a header timestamp.
 */
export async function* readArchive(archivePath: string, options: ReadArchiveOptions = {}): AsyncGenerator<Snapshot> {
  const { warnings = new WarningSink(), onProgress, maxSnapshotBytes = 64 * 1024 * 1024 } = options;
  const stats: ArchiveStats = options.stats ?? { filesSeen: 0, snapshotsRead: 0, snapshotsSkipped: 0 };
  if (typeof archivePath !== 'string' || archivePath === '') {
    throw new StopspanError('bad-option', 'invalid option archivePath: expected a folder or zip path', { value: String(archivePath) });
  }
  if (!(Number.isFinite(maxSnapshotBytes) && maxSnapshotBytes > 0)) {
    throw new StopspanError('bad-option', 'invalid option maxSnapshotBytes: expected a positive number', {
      value: String(maxSnapshotBytes),
    });
  }
  const { refs, zip } = await listArchive(archivePath, maxSnapshotBytes);
  try {
    const indexed = await indexSnapshots(refs, { warnings, stats, onProgress, maxSnapshotBytes });
    let done = 0;
    for (const it of indexed) {
      onProgress?.({ stage: 'realtime decode', done: ++done, total: indexed.length, unit: 'snapshots' });
      let message: FeedMessage;
      try {
        const buf = maybeGunzip(await it.ref.load(), maxSnapshotBytes);
        message = transit_realtime.FeedMessage.decode(buf);
      } catch (e) {
        stats.snapshotsSkipped++;
        warnings.add('realtime-undecodable', `${it.ref.name}: ${(e as Error).message}`);
        continue;
      }
      stats.snapshotsRead++;
      yield { name: it.ref.name, timestampS: it.timestampS, message };
    }
  } finally {
    zip?.close();
  }
}

/** The files of the archive, a folder, a zip (left open for reading, closed by the caller) or a single snapshot file. */
async function listArchive(archivePath: string, maxSnapshotBytes: number): Promise<{ refs: EntryRef[]; zip: yauzl.ZipFile | null }> {
  let st;
  try {
    st = await fsp.stat(archivePath);
  } catch {
    throw new StopspanError('bad-realtime', 'realtime archive not found', { file: archivePath });
  }
  if (st.isDirectory()) return { refs: await listFolder(archivePath), zip: null };
  if (await isZipFile(archivePath)) {
    let zip: yauzl.ZipFile | null = null;
    try {
      zip = await openZip(archivePath);
      return { refs: await listZip(zip, maxSnapshotBytes), zip };
    } catch (e) {
      zip?.close();
      throw new StopspanError('bad-realtime', `realtime archive is not a readable zip: ${(e as Error).message}`, { file: archivePath });
    }
  }
  // a single snapshot file
  const dir = path.dirname(archivePath);
  return { refs: [{ name: path.relative(dir, archivePath), load: () => fsp.readFile(archivePath) }], zip: null };
}

/** The first pass: each file's header read, the unusable counted and left out, the rest in time order (ties by name). */
async function indexSnapshots(
  refs: EntryRef[],
  {
    warnings,
    stats,
    onProgress,
    maxSnapshotBytes,
  }: { warnings: WarningSink; stats: ArchiveStats; onProgress?: OnProgress; maxSnapshotBytes: number },
): Promise<Indexed[]> {
  const indexed: Indexed[] = [];
  let order = 0;
  let nameOrderBroken = 0;
  let lastTs = -Infinity;
  for (const ref of refs) {
    stats.filesSeen++;
    onProgress?.({ stage: 'realtime index', done: stats.filesSeen, total: refs.length, unit: 'files' });
    let header;
    try {
      const buf = maybeGunzip(await ref.load(), maxSnapshotBytes);
      header = scanHeader(buf);
    } catch (e) {
      stats.snapshotsSkipped++;
      warnings.add('realtime-undecodable', `${ref.name}: ${(e as Error).message}`);
      continue;
    }
    if (header.incrementality === transit_realtime.FeedHeader.Incrementality.DIFFERENTIAL) {
      stats.snapshotsSkipped++;
      warnings.add('realtime-differential', ref.name);
      continue;
    }
    const ts = toNumber(header.timestamp);
    if (!(ts > 0)) {
      stats.snapshotsSkipped++;
      warnings.add('realtime-no-timestamp', ref.name);
      continue;
    }
    if (ts < lastTs) nameOrderBroken++;
    lastTs = ts;
    indexed.push({ ref, timestampS: ts, order: order++ });
  }
  if (nameOrderBroken > 0) {
    warnings.add('realtime-reordered', undefined, nameOrderBroken);
  }
  indexed.sort((a, b) => a.timestampS - b.timestampS || a.order - b.order);
  return indexed;
}

export { toNumber as longToNumber };
