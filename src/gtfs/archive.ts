// Opens a feed as a set of named tables, from a .zip (read lazily with yauzl), a folder of .txt files, or
// an http(s) URL (downloaded to a temporary file first). Every entry is bounded: absurd declared sizes or
// compression ratios are refused up front, and inflated bytes are counted while streaming because a
// declared size can lie: an entry is refused as soon as it inflates past its declared size, and its
// CRC-32 is checked at its end. Archive paths are never written to disk; unsafe ones
// are skipped and counted; an archive of more entries than any feed has, or naming a table twice, is refused.

import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { readdir, readFile, stat } from 'node:fs/promises';
import { join } from 'node:path';
import { Readable, Transform, type TransformCallback } from 'node:stream';
import { crc32, createInflateRaw } from 'node:zlib';
import type * as Yauzl from 'yauzl';
import { StopspanError } from '../common/errors.js';
import { requireCjs } from '../common/requireCjs.js';
import type { OnProgress } from '../common/progress.js';
import type { WarningSink } from '../common/warnings.js';
import { downloadFeed, isUrl, type DownloadLimits, type FetchOptions } from './download.js';
import { shownUrl } from './requestHeaders.js';

const yauzl = requireCjs('yauzl') as typeof Yauzl;

export interface ArchiveLimits {
  /** Largest declared or actual uncompressed size of one entry, in bytes. Default 4 GiB. */
  maxEntryBytes?: number;
  /**
   * Largest uncompressed/compressed ratio of one entry, declared (entries over 1 MiB only; an entry
   * cannot inflate past its declared size). Default 1000.
   */
  maxRatio?: number;
  /** Largest total of inflated bytes over all entries read from one archive. Default 16 GiB. */
  maxTotalBytes?: number;
  /** Most entries (files and folders) a zip may list. Default 10 000; a feed has a few dozen. */
  maxEntries?: number;
}

export const DEFAULT_ARCHIVE_LIMITS: Required<ArchiveLimits> = {
  maxEntryBytes: 4 * 1024 ** 3,
  maxRatio: 1000,
  maxTotalBytes: 16 * 1024 ** 3,
  maxEntries: 10_000,
};

/** Inflated bytes of an entry before its actual compression ratio is held to the cap: 1 MiB. */
const RATIO_FROM_BYTES = 1024 * 1024;

export interface FeedArchive {
  kind: 'zip' | 'folder';
  /** Table file names available, e.g. 'stops.txt' (without any subfolder prefix). */
  names(): string[];
  has(name: string): boolean;
  /** Uncompressed size in bytes when known. */
  size(name: string): number | undefined;
  /**
   * Streams one table's bytes, bounded by the limits. `readAheadBytes` (default 4 MiB) is how far the
   * stream may run ahead of its reader: opened early with a deep read-ahead, a big table inflates on the
   * thread pool while this thread still parses the tables before it.
   */
  open(name: string, options?: { readAheadBytes?: number }): Promise<Readable>;
  /** sha256 hex of the archive file, or of the folder's .txt files in name order (name, NUL, bytes each). */
  contentHash(): Promise<string>;
  /** Releases the zip file handle and removes a downloaded temporary file. */
  close(): Promise<void>;
}

export interface OpenFeedOptions {
  limits?: ArchiveLimits;
  download?: DownloadLimits;
  /** Headers, cache and proxy settings of a download (see FetchOptions). */
  fetch?: FetchOptions;
  warnings?: WarningSink;
  onProgress?: OnProgress;
}

/** Opens a .zip path, a folder or an http(s) URL. Throws 'feed-unreadable', 'feed-too-large' or 'download-failed'. */
export async function openFeed(
  source: string,
  { limits = {}, download, fetch, warnings, onProgress }: OpenFeedOptions = {},
): Promise<FeedArchive> {
  const lim = { ...DEFAULT_ARCHIVE_LIMITS, ...limits };
  for (const [k, v] of Object.entries(lim)) {
    if (!(typeof v === 'number' && v > 0))
      throw new StopspanError('bad-option', `invalid option limits.${k}: expected a positive number`, { value: String(v) });
  }
  if (typeof source !== 'string' || source === '')
    throw new StopspanError('bad-option', 'invalid option source: expected a path or URL', { value: String(source) });
  if (isUrl(source)) {
    const dl = await downloadFeed(source, { ...fetch, limits: download, onProgress, warnings });
    try {
      const zip = await openZip(dl.path, shownUrl(source), lim, warnings);
      const close = zip.close;
      zip.close = async () => {
        await close();
        await dl.cleanup();
      };
      return zip;
    } catch (e) {
      await dl.cleanup();
      throw e;
    }
  }
  let st;
  try {
    st = await stat(source);
  } catch {
    throw unreadable(source, 'no such file or folder');
  }
  if (st.isDirectory()) return openFolder(source, lim);
  if (st.size === 0) throw unreadable(source, 'the file is empty');
  return openZip(source, source, lim, warnings);
}

function unreadable(file: string, why: string): StopspanError {
  return new StopspanError('feed-unreadable', `cannot read the feed: ${why}`, { file });
}

async function openFolder(dir: string, lim: Required<ArchiveLimits>): Promise<FeedArchive> {
  let files: string[];
  try {
    files = (await readdir(dir, { withFileTypes: true }))
      .filter((d) => d.isFile() && d.name.endsWith('.txt'))
      .map((d) => d.name)
      .sort();
  } catch (e) {
    throw unreadable(dir, (e as Error).message.split('\n')[0]);
  }
  const sizes = new Map<string, number>();
  for (const f of files) sizes.set(f, (await stat(join(dir, f))).size);
  let total = 0;
  const counter = (name: string, readAheadBytes?: number) =>
    new ByteCap(
      name,
      lim.maxEntryBytes,
      () => total,
      (n) => (total += n),
      lim.maxTotalBytes,
      undefined,
      readAheadBytes,
    );
  return {
    kind: 'folder',
    names: () => [...files],
    has: (n) => sizes.has(n),
    size: (n) => sizes.get(n),
    async open(name, { readAheadBytes } = {}) {
      if (!sizes.has(name)) throw unreadable(join(dir, name), 'no such table');
      const sz = sizes.get(name)!;
      if (sz > lim.maxEntryBytes) throw tooLarge(name, `${sz} bytes exceeds the per-table cap of ${lim.maxEntryBytes}`);
      return createReadStream(join(dir, name), { highWaterMark: 1 << 20 }).pipe(counter(name, readAheadBytes));
    },
    async contentHash() {
      const h = createHash('sha256');
      for (const f of files) {
        h.update(f);
        h.update('\0');
        for await (const chunk of createReadStream(join(dir, f))) h.update(chunk as Buffer);
      }
      return h.digest('hex');
    },
    async close() {},
  };
}

function tooLarge(name: string, why: string): StopspanError {
  return new StopspanError('feed-too-large', `zip entry too large: ${why}`, { file: name });
}

/** What a zip entry's directory says of it, checked while it inflates, and how to name the entry. */
interface DeclaredEntry {
  file: string;
  /** Uncompressed size. */
  bytes: number;
  /** CRC-32 of the uncompressed bytes. */
  crc: number;
}

/**
 * Counts bytes through a stream and fails once an entry or the archive total passes its cap; for a zip
 * entry also as soon as it inflates past its declared size, and at its end when its size or CRC-32
 * differs from the declared ones.
 */
class ByteCap extends Transform {
  private seen = 0;
  private crc = 0;
  constructor(
    private readonly name: string,
    private readonly maxEntry: number,
    private readonly total: () => number,
    private readonly addTotal: (n: number) => void,
    private readonly maxTotal: number,
    private readonly declared?: DeclaredEntry,
    readAheadBytes = 4 << 20,
  ) {
    // a deep buffer lets inflating (on the thread pool) run ahead while the CSV reader parses
    super({ readableHighWaterMark: Math.max(4 << 20, readAheadBytes), writableHighWaterMark: 1 << 20 });
  }
  override _transform(chunk: Buffer, _enc: BufferEncoding, cb: TransformCallback): void {
    this.seen += chunk.length;
    this.addTotal(chunk.length);
    if (this.seen > this.maxEntry) return cb(tooLarge(this.name, `inflated past the per-entry cap of ${this.maxEntry} bytes`));
    if (this.total() > this.maxTotal) return cb(tooLarge(this.name, `archive inflated past the total cap of ${this.maxTotal} bytes`));
    const d = this.declared;
    if (d) {
      // a lying header is caught here, not after gigabytes: the reader downstream holds what it was given
      // (so the ratio checked up front on the declared size also holds for the bytes inflated: a small
      // declared size cannot let a large entry through)
      if (this.seen > d.bytes) return cb(unreadable(d.file, `corrupt zip entry (inflates past the ${d.bytes} bytes it declares)`));
      this.crc = crc32(chunk, this.crc);
    }
    cb(null, chunk);
  }
  override _flush(cb: TransformCallback): void {
    const d = this.declared;
    if (d && this.seen !== d.bytes)
      return cb(unreadable(d.file, `corrupt or truncated zip entry (${this.seen} bytes inflated, ${d.bytes} declared)`));
    // [PKWARE APPNOTE 4.4.7: the CRC-32 of the uncompressed data]
    if (d && this.crc >>> 0 !== d.crc >>> 0)
      return cb(unreadable(d.file, 'corrupt zip entry (CRC-32 of the inflated bytes differs from the one recorded)'));
    cb();
  }
}

interface ZipTable {
  entry: Yauzl.Entry;
  path: string;
}

function openZipFile(path: string): Promise<Yauzl.ZipFile> {
  return new Promise((resolve, reject) => {
    yauzl.open(path, { lazyEntries: true, autoClose: false, decodeStrings: false, validateEntrySizes: true }, (err, zf) => {
      if (err || !zf) reject(err ?? new Error('no zip'));
      else resolve(zf);
    });
  });
}

function listEntries(zf: Yauzl.ZipFile): Promise<Yauzl.Entry[]> {
  return new Promise((resolve, reject) => {
    const out: Yauzl.Entry[] = [];
    zf.on('entry', (e: Yauzl.Entry) => {
      out.push(e);
      zf.readEntry();
    });
    zf.on('end', () => resolve(out));
    zf.on('error', reject);
    zf.readEntry();
  });
}

async function openZip(path: string, label: string, lim: Required<ArchiveLimits>, warnings?: WarningSink): Promise<FeedArchive> {
  let zf: Yauzl.ZipFile;
  let entries: Yauzl.Entry[];
  try {
    zf = await openZipFile(path);
  } catch (e) {
    throw unreadable(label, `not a readable zip archive (${oneLineOf(e)})`);
  }
  // the count comes from the end record, before any entry is listed: a flood of entries costs nothing
  if (zf.entryCount > lim.maxEntries) {
    zf.close();
    throw new StopspanError('feed-too-large', `the archive lists ${zf.entryCount} entries, over the cap of ${lim.maxEntries}`, {
      file: label,
    });
  }
  try {
    entries = await listEntries(zf);
  } catch (e) {
    zf.close();
    throw unreadable(label, `not a readable zip archive (${oneLineOf(e)})`);
  }
  // decode names ourselves so an unsafe name skips that entry instead of failing the whole archive
  const named: ZipTable[] = [];
  for (const entry of entries) {
    const raw = entry.fileName as unknown as Buffer;
    const name = yauzl.getFileNameLowLevel(entry.generalPurposeBitFlag, raw, entry.extraFields, false);
    if (name.endsWith('/')) continue;
    if (yauzl.validateFileName(name) !== null) {
      warnings?.add('unsafe-zip-path', name);
      continue;
    }
    named.push({ entry, path: name });
  }
  // tables at the root, or else all in one subfolder (the one holding stops.txt or trips.txt)
  const root = named.filter((t) => !t.path.includes('/') && t.path.endsWith('.txt'));
  let chosen = root;
  if (!root.some((t) => t.path === 'stops.txt' || t.path === 'trips.txt')) {
    const anchor = named.find((t) => /^[^/]+\/(stops|trips)\.txt$/.test(t.path));
    if (anchor) {
      const prefix = anchor.path.slice(0, anchor.path.indexOf('/') + 1);
      chosen = named.filter((t) => t.path.startsWith(prefix) && !t.path.slice(prefix.length).includes('/') && t.path.endsWith('.txt'));
    }
  }
  const tables = new Map<string, Yauzl.Entry>();
  for (const t of chosen) {
    const base = t.path.slice(t.path.lastIndexOf('/') + 1);
    // two entries of one name: which one the publisher meant is unknowable (readers differ on it)
    if (tables.has(base)) {
      zf.close();
      throw unreadable(`${label}:${t.path}`, 'the archive holds two entries of this name');
    }
    tables.set(base, t.entry);
  }
  let total = 0;
  let closed = false;
  return {
    kind: 'zip',
    names: () => [...tables.keys()].sort(),
    has: (n) => tables.has(n),
    size: (n) => tables.get(n)?.uncompressedSize,
    async open(name, { readAheadBytes } = {}) {
      const entry = tables.get(name);
      if (!entry) throw unreadable(`${label}:${name}`, 'no such table in the archive');
      const u = entry.uncompressedSize;
      const c = entry.compressedSize;
      if (u > lim.maxEntryBytes) throw tooLarge(name, `declared size ${u} bytes exceeds the per-entry cap of ${lim.maxEntryBytes}`);
      if (u > RATIO_FROM_BYTES && c > 0 && u / c > lim.maxRatio)
        throw tooLarge(name, `compression ratio ${Math.round(u / c)} exceeds the cap of ${lim.maxRatio}`);
      if (u > RATIO_FROM_BYTES && c === 0) throw tooLarge(name, `declares ${u} bytes from an empty compressed body`);
      // a deflated entry is read raw and inflated here, with an output buffer of 1 MiB instead of zlib's
      // 16 KiB: each buffer is a round trip between the thread pool and this thread, and with small ones
      // those round trips, not inflating, set the pace (measured on a 75 MB stop_times.txt: inflating and
      // counting lines took 675 ms of CPU with 16 KiB buffers, 405 ms with 1 MiB)
      const deflated = entry.compressionMethod === 8;
      const raw = deflated
        ? await deflatedBody(zf, path, entry, `${label}:${name}`)
        : await new Promise<Readable>((resolve, reject) => {
            zf.openReadStream(entry, {}, (err, rs) => {
              if (err || !rs) reject(unreadable(`${label}:${name}`, `corrupt zip entry (${oneLineOf(err)})`));
              else resolve(rs);
            });
          });
      const cap = new ByteCap(
        name,
        lim.maxEntryBytes,
        () => total,
        (n) => (total += n),
        lim.maxTotalBytes,
        { bytes: u, file: `${label}:${name}`, crc: entry.crc32 },
        readAheadBytes,
      );
      const fail = (err: unknown): void => {
        cap.destroy(
          err instanceof StopspanError ? err : unreadable(`${label}:${name}`, `corrupt or truncated zip entry (${oneLineOf(err)})`),
        );
      };
      raw.on('error', fail);
      if (!deflated) return raw.pipe(cap);
      const inflate = createInflateRaw({ chunkSize: 1 << 20 });
      inflate.on('error', fail);
      cap.on('close', () => {
        raw.destroy();
        inflate.destroy();
      });
      return raw.pipe(inflate).pipe(cap);
    },
    contentHash: () => fileSha256(path),
    async close() {
      if (closed) return;
      closed = true;
      zf.close();
    },
  };
}

/**
 * The deflated body of an entry, read straight from the file in 1 MiB pieces. yauzl's own stream reads it
 * 16 KiB at a time through two pass-through streams, and on Manhattan's stop_times.txt (9 MB deflated)
 * those 580 chunks cost the main thread more than inflating them.
 */
async function deflatedBody(zf: Yauzl.ZipFile, path: string, entry: Yauzl.Entry, file: string): Promise<Readable> {
  if (entry.isEncrypted()) throw unreadable(file, 'corrupt zip entry (the entry is encrypted)');
  const start = await new Promise<number>((resolve, reject) => {
    // the local header's name and extra field lengths say where the body starts; yauzl checks it lies in the file
    zf.readLocalFileHeader(entry, { minimal: true }, (err, header) => {
      if (err || !header) reject(unreadable(file, `corrupt zip entry (${oneLineOf(err)})`));
      else resolve(header.fileDataStart);
    });
  });
  if (entry.compressedSize === 0) return Readable.from([]);
  return createReadStream(path, { start, end: start + entry.compressedSize - 1, highWaterMark: 1 << 20 });
}

/** Files up to this size are read whole and hashed in one call: 64 MiB. */
const HASH_WHOLE_BYTES = 64 << 20;

/**
 * sha256 hex of a file. Up to 64 MiB it is read whole (on the thread pool) and hashed in one call: with the
 * processor's SHA instructions that is about 6 ms of this thread for Manhattan's 10 MB zip, where handing
 * the buffer to WebCrypto's pool job cost 40-50 ms of CPU and about 70 ms before the answer came back
 * (medians of three, 2 cores); a larger file streams through the hash in 1 MiB pieces, so memory stays
 * bounded (wholeUpTo: the size limit, for tests).
 */
export async function fileSha256(path: string, wholeUpTo = HASH_WHOLE_BYTES): Promise<string> {
  const { size } = await stat(path);
  if (size <= wholeUpTo)
    return createHash('sha256')
      .update(await readFile(path))
      .digest('hex');
  const h = createHash('sha256');
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) h.update(chunk as Buffer);
  return h.digest('hex');
}

function oneLineOf(e: unknown): string {
  const m = e instanceof Error ? e.message : String(e);
  return m.split('\n')[0];
}
