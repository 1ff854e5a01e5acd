// The download cache: a feed fetched from a URL before is kept in a per-user folder, so that the next run
// asks the server whether it changed (If-None-Match / If-Modified-Since) and reuses the kept copy on a
// 304. One entry per URL, a folder named by the sha256 of the URL holding feed.zip and entry.json (the
// URL without credentials, ETag, Last-Modified, size, time). An entry is built in a temporary folder of
// the cache and renamed into place, so a killed run never leaves half an entry under an entry's name; an
// entry is still checked (size, zip head and tail) before it is trusted. The least recently used entries
// are removed past a count and a byte total. Nothing outside the cache folder is ever removed, nor
// anything in it that is not named and shaped as this module's own.

import { createHash, randomBytes } from 'node:crypto';
import { rmSync } from 'node:fs';
import { copyFile, link, lstat, mkdir, open, readdir, readFile, rename, rm, utimes, writeFile } from 'node:fs/promises';
import { homedir } from 'node:os';
import { isAbsolute, join } from 'node:path';
import { pidAlive, undoOnInterrupt } from '../common/interrupts.js';
import { shownUrl } from './requestHeaders.js';

export interface CacheOptions {
  /** The cache folder (default: $STOPSPAN_CACHE_DIR, else $XDG_CACHE_HOME/stopspan, else ~/.cache/stopspan). */
  dir?: string;
  /** Entries kept, the most recently used first. Default 8. */
  maxEntries?: number;
  /** Bytes kept in all; a feed larger than this is not kept. Default 2 GiB. */
  maxBytes?: number;
}

export const DEFAULT_CACHE_LIMITS = { maxEntries: 8, maxBytes: 2 * 1024 * 1024 * 1024 } as const;

export interface EntryMeta {
  url: string;
  etag?: string;
  lastModified?: string;
  bytes: number;
  savedAt: string;
}

export interface CacheEntry {
  dir: string;
  body: string;
  meta: EntryMeta;
}

const BODY = 'feed.zip';
const META = 'entry.json';
const ENTRY_NAME = /^[0-9a-f]{64}$/;
const WORK_NAME = /^\.(tmp|old)-(\d+)-[0-9a-f]{12}$/;
const MAX_META_BYTES = 64 * 1024;
/** A zip archive's first four bytes (a local file header's signature); download.ts checks a body by them too. */
export const ZIP_HEAD = Buffer.from([0x50, 0x4b, 0x03, 0x04]);
const ZIP_END = Buffer.from([0x50, 0x4b, 0x05, 0x06]);
/** The end-of-central-directory record is in the last 22 bytes, or up to a 65 535-byte comment before them. */
const ZIP_TAIL_BYTES = 22 + 65_535;

/** The cache folder for this user, from the environment. */
export function cacheFolder(env: Readonly<Record<string, string | undefined>>): string {
  if (env.STOPSPAN_CACHE_DIR) return env.STOPSPAN_CACHE_DIR;
  const xdg = env.XDG_CACHE_HOME;
  if (xdg && isAbsolute(xdg)) return join(xdg, 'stopspan');
  return join(homedir(), '.cache', 'stopspan');
}

/** The entry's folder name: the sha256 of the URL as given. */
export function entryKey(url: string): string {
  return createHash('sha256').update(url, 'utf8').digest('hex');
}

/** The entry for url when it is complete and sound (its size as recorded, a zip head and tail), else null. Never throws. */
export async function readEntry(root: string, url: string): Promise<CacheEntry | null> {
  const dir = join(root, entryKey(url));
  const body = join(dir, BODY);
  try {
    const metaPath = join(dir, META);
    const st = await lstat(metaPath);
    if (!st.isFile() || st.size > MAX_META_BYTES) return null;
    const meta = parseMeta(await readFile(metaPath, 'utf8'));
    if (!meta || meta.url !== shownUrl(url) || !(meta.etag || meta.lastModified)) return null;
    return (await soundZip(body, meta.bytes)) ? { dir, body, meta } : null;
  } catch {
    return null;
  }
}

function parseMeta(text: string): EntryMeta | null {
  let v: unknown;
  try {
    v = JSON.parse(text);
  } catch {
    return null;
  }
  if (typeof v !== 'object' || v === null) return null;
  const m = v as Record<string, unknown>;
  const optional = (x: unknown) => x === undefined || typeof x === 'string';
  if (typeof m.url !== 'string' || typeof m.savedAt !== 'string' || !optional(m.etag) || !optional(m.lastModified)) return null;
  if (typeof m.bytes !== 'number' || !Number.isSafeInteger(m.bytes) || m.bytes < 4) return null;
  return m as unknown as EntryMeta;
}

/** Whether path is a regular file of exactly `bytes` bytes that starts and ends like a zip archive. */
export async function soundZip(path: string, bytes: number): Promise<boolean> {
  const st = await lstat(path);
  if (!st.isFile() || st.size !== bytes) return false;
  const fh = await open(path, 'r');
  try {
    const head = Buffer.alloc(4);
    await fh.read(head, 0, 4, 0);
    if (!head.equals(ZIP_HEAD)) return false;
    const n = Math.min(bytes, ZIP_TAIL_BYTES);
    const tail = Buffer.alloc(n);
    await fh.read(tail, 0, n, bytes - n);
    return tail.lastIndexOf(ZIP_END) >= 0;
  } finally {
    await fh.close();
  }
}

/** The conditional request headers that ask whether the entry is still current. */
export function validators(entry: CacheEntry | null): Record<string, string> {
  const out: Record<string, string> = {};
  if (entry?.meta.etag) out['if-none-match'] = entry.meta.etag;
  if (entry?.meta.lastModified) out['if-modified-since'] = entry.meta.lastModified;
  return out;
}

/** Puts a copy of the entry's body at dest (a hard link when the folders share a file system) and marks it used. */
export async function copyOut(entry: CacheEntry, dest: string): Promise<void> {
  await linkOrCopy(entry.body, dest);
  if (!(await soundZip(dest, entry.meta.bytes))) throw new Error('the kept copy changed while it was read');
  const now = new Date();
  await utimes(entry.dir, now, now).catch(() => undefined);
}

/**
 * Keeps the file at bodyPath as url's entry, replacing the previous one whole, then trims the cache to
 * its limits. Throws when the cache folder cannot be written (the caller warns and goes on).
 */
export async function storeEntry(
  root: string,
  url: string,
  bodyPath: string,
  meta: Omit<EntryMeta, 'url' | 'savedAt'>,
  limits: Required<Omit<CacheOptions, 'dir'>>,
): Promise<void> {
  if (meta.bytes > limits.maxBytes) return;
  await mkdir(root, { recursive: true, mode: 0o700 });
  await sweepWork(root);
  const key = entryKey(url);
  const work = join(root, workName('tmp'));
  const forget = undoOnInterrupt(() => rmSync(work, { recursive: true, force: true }));
  try {
    await mkdir(work, { mode: 0o700 });
    await linkOrCopy(bodyPath, join(work, BODY));
    const full: EntryMeta = { url: shownUrl(url), ...meta, savedAt: new Date().toISOString() };
    await writeFile(join(work, META), JSON.stringify(full, null, 2) + '\n', { mode: 0o600 });
    await putInPlace(root, work, key);
  } finally {
    await rm(work, { recursive: true, force: true });
    forget();
  }
  await trim(root, limits, key);
}

/** A hard link to the file when both folders share a file system, else a copy. */
async function linkOrCopy(from: string, to: string): Promise<void> {
  try {
    await link(from, to);
  } catch {
    await copyFile(from, to);
  }
}

function workName(kind: 'tmp' | 'old'): string {
  return `.${kind}-${process.pid}-${randomBytes(6).toString('hex')}`;
}

/** Renames work to the entry's name; a previous entry is first renamed aside, then removed. */
async function putInPlace(root: string, work: string, key: string): Promise<void> {
  const target = join(root, key);
  const aside = join(root, workName('old'));
  let moved = false;
  try {
    await rename(target, aside);
    moved = true;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw e;
  }
  try {
    await rename(work, target);
  } catch (e) {
    // another run put its copy in place meanwhile: as good as ours
    if (!['ENOTEMPTY', 'EEXIST'].includes((e as NodeJS.ErrnoException).code ?? '')) throw e;
  }
  if (moved) await rm(aside, { recursive: true, force: true });
}

/** Removes working folders (.tmp-PID-*, .old-PID-*) left by runs no longer alive. */
async function sweepWork(root: string): Promise<void> {
  for (const e of await readdir(root, { withFileTypes: true })) {
    const m = WORK_NAME.exec(e.name);
    if (!m || !e.isDirectory() || pidAlive(Number(m[2]))) continue;
    await rm(join(root, e.name), { recursive: true, force: true }).catch(() => undefined);
  }
}

/** Removes the least recently used entries past maxEntries or maxBytes; `keep` (the entry just stored) stays. */
export async function trim(root: string, limits: Required<Omit<CacheOptions, 'dir'>>, keep?: string): Promise<string[]> {
  const entries: { name: string; used: number; bytes: number }[] = [];
  for (const e of await readdir(root, { withFileTypes: true })) {
    if (!e.isDirectory() || !ENTRY_NAME.test(e.name)) continue;
    const dir = join(root, e.name);
    try {
      if (!isEntryShaped(await readdir(dir))) continue; // not this module's: neither counted nor removed
      const st = await lstat(dir);
      const body = await lstat(join(dir, BODY)).catch(() => null);
      entries.push({ name: e.name, used: st.mtimeMs, bytes: body?.isFile() ? body.size : 0 });
    } catch {
      // removed by another run meanwhile
    }
  }
  entries.sort((a, b) => (a.name === keep ? -1 : b.name === keep ? 1 : b.used - a.used));
  const removed: string[] = [];
  let count = 0;
  let bytes = 0;
  for (const e of entries) {
    count++;
    bytes += e.bytes;
    if (e.name === keep || (count <= limits.maxEntries && bytes <= limits.maxBytes)) continue;
    if (await removeEntry(join(root, e.name))) removed.push(e.name);
    count--;
    bytes -= e.bytes;
  }
  return removed;
}

/** Whether a folder's names are an entry's: its two files, or one of them (an entry half removed by hand). */
function isEntryShaped(names: string[]): boolean {
  return names.length > 0 && names.every((n) => n === BODY || n === META);
}

/** Removes an entry folder only when it holds nothing but an entry's two files. */
async function removeEntry(dir: string): Promise<boolean> {
  try {
    if (!isEntryShaped(await readdir(dir))) return false;
    await rm(dir, { recursive: true, force: true });
    return true;
  } catch {
    return false;
  }
}
