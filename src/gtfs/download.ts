// Fetches a feed from an http(s) URL into a private temporary file, bounded in redirects, time and size,
// and checks that the body starts like a zip archive before anyone opens it. The caller removes the file;
// an interrupt removes it too (common/interrupts.ts), and a folder left by a run that was killed outright
// (its pid no longer alive) is removed by the next download.

import { createWriteStream, rmSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import type http from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { StopspanError } from '../common/errors.js';
import { staleRunFolders, undoOnInterrupt } from '../common/interrupts.js';
import type { OnProgress } from '../common/progress.js';

export interface DownloadLimits {
  /** Redirects followed before giving up. Default 5. */
  maxRedirects?: number;
  /** Whole-download deadline in milliseconds (connect, headers and body). Default 120 000. */
  timeoutMs?: number;
  /** Largest body accepted, in bytes. Default 1 GiB. */
  maxBytes?: number;
}

export interface DownloadedFile {
  path: string;
  bytes: number;
  /** Removes the temporary file and its folder; safe to call twice. */
  cleanup: () => Promise<void>;
}

export const DEFAULT_DOWNLOAD_LIMITS: Required<DownloadLimits> = {
  maxRedirects: 5,
  timeoutMs: 120_000,
  maxBytes: 1024 * 1024 * 1024,
};

const ZIP_SIGNATURE = Buffer.from([0x50, 0x4b, 0x03, 0x04]);

export function isUrl(source: string): boolean {
  return /^https?:\/\//i.test(source);
}

/** Downloads url to a temporary file. Throws StopspanError 'download-failed' with the reason. */
export async function downloadFeed(
  url: string,
  { limits = {}, onProgress }: { limits?: DownloadLimits; onProgress?: OnProgress } = {},
): Promise<DownloadedFile> {
  const { maxRedirects, timeoutMs, maxBytes } = { ...DEFAULT_DOWNLOAD_LIMITS, ...limits };
  if (!isUrl(url)) throw new StopspanError('bad-option', 'invalid option source: expected an http(s) URL', { value: url });
  if (!(maxRedirects >= 0))
    throw new StopspanError('bad-option', 'invalid option maxRedirects: expected >= 0', { value: String(maxRedirects) });
  if (!(timeoutMs > 0)) throw new StopspanError('bad-option', 'invalid option timeoutMs: expected > 0', { value: String(timeoutMs) });
  if (!(maxBytes > 0)) throw new StopspanError('bad-option', 'invalid option maxBytes: expected > 0', { value: String(maxBytes) });

  await sweepStaleDownloads();
  const dir = await mkdtemp(join(tmpdir(), `${DOWNLOAD_PREFIX}${process.pid}-`));
  const path = join(dir, 'feed.zip');
  const forget = undoOnInterrupt(() => rmSync(dir, { recursive: true, force: true }));
  const cleanup = async (): Promise<void> => {
    await rm(dir, { recursive: true, force: true });
    forget();
  };
  const deadline = Date.now() + timeoutMs;
  try {
    let current = url;
    for (let hop = 0; ; hop++) {
      const res = await request(current, deadline, url);
      const status = res.statusCode ?? 0;
      if (status >= 300 && status < 400 && res.headers.location) {
        res.resume();
        if (hop >= maxRedirects) fail(url, `more than ${maxRedirects} redirects`);
        const next = new URL(res.headers.location, current);
        if (next.protocol !== 'http:' && next.protocol !== 'https:') fail(url, `redirect to a non-http URL ${next.protocol}`);
        current = next.toString();
        continue;
      }
      if (status !== 200) {
        res.resume();
        fail(url, `HTTP status ${status}`);
      }
      const declared = Number(res.headers['content-length']);
      if (Number.isFinite(declared) && declared > maxBytes) {
        res.destroy();
        fail(url, `body of ${declared} bytes exceeds the cap of ${maxBytes} bytes`);
      }
      const bytes = await saveBody(res, path, {
        deadline,
        maxBytes,
        url,
        onProgress,
        total: Number.isFinite(declared) ? declared : undefined,
      });
      return { path, bytes, cleanup };
    }
  } catch (e) {
    await cleanup();
    throw e;
  }
}

/** Download folders are `stopspan-dl-PID-XXXXXX` in the system's temporary folder. */
const DOWNLOAD_PREFIX = 'stopspan-dl-';
const DOWNLOAD_DIR = /^stopspan-dl-(\d+)-[A-Za-z0-9]{6}$/;

/**
 * Removes download folders of this tool whose run is over (its pid no longer alive): a run killed outright
 * (SIGKILL, power loss) leaves up to maxBytes behind. Never throws. Returns the folders removed.
 */
export async function sweepStaleDownloads(parent = tmpdir()): Promise<string[]> {
  const removed: string[] = [];
  // a download leaves only feed.zip in its folder; anything else is not ours to touch
  for (const { path } of await staleRunFolders(parent, DOWNLOAD_DIR, 1, (name) => name === 'feed.zip')) {
    try {
      await rm(path, { recursive: true, force: true });
      removed.push(path);
    } catch {
      // gone already
    }
  }
  return removed;
}

function fail(url: string, why: string): never {
  throw new StopspanError('download-failed', `cannot download the feed: ${why}`, { file: url });
}

/** The http or https module, loaded on the first download: loading both costs every other run start-up time. */
async function client(target: string): Promise<typeof http> {
  return target.startsWith('https:')
    ? ((await import('node:https')).default as unknown as typeof http)
    : (await import('node:http')).default;
}

async function request(target: string, deadline: number, original: string): Promise<http.IncomingMessage> {
  const mod = await client(target);
  return new Promise((resolve, reject) => {
    const left = deadline - Date.now();
    if (left <= 0) return reject(new StopspanError('download-failed', 'cannot download the feed: timed out', { file: original }));
    const req = mod.get(target, { headers: { 'user-agent': 'stopspan', accept: 'application/zip, */*' } }, (res) => {
      clearTimeout(timer);
      resolve(res);
    });
    const timer = setTimeout(() => {
      req.destroy();
      reject(new StopspanError('download-failed', 'cannot download the feed: timed out waiting for a response', { file: original }));
    }, left);
    req.on('error', (err) => {
      clearTimeout(timer);
      reject(new StopspanError('download-failed', `cannot download the feed: ${err.message}`, { file: original }));
    });
  });
}

function saveBody(
  res: http.IncomingMessage,
  path: string,
  {
    deadline,
    maxBytes,
    url,
    onProgress,
    total,
  }: { deadline: number; maxBytes: number; url: string; onProgress?: OnProgress; total?: number },
): Promise<number> {
  return new Promise((resolve, reject) => {
    const out = createWriteStream(path, { flags: 'wx', mode: 0o600 });
    let bytes = 0;
    let head = Buffer.alloc(0);
    let done = false;
    let lastReport = 0;
    const finish = (err: StopspanError | null): void => {
      if (done) return;
      done = true;
      clearTimeout(timer);
      if (err) {
        res.destroy();
        out.destroy();
        reject(err);
        return;
      }
      out.end(() => resolve(bytes));
    };
    const timer = setTimeout(
      () => finish(new StopspanError('download-failed', 'cannot download the feed: timed out while reading the body', { file: url })),
      Math.max(1, deadline - Date.now()),
    );
    res.on('data', (chunk: Buffer) => {
      if (done) return;
      bytes += chunk.length;
      if (bytes > maxBytes)
        return finish(
          new StopspanError('download-failed', `cannot download the feed: body exceeds the cap of ${maxBytes} bytes`, { file: url }),
        );
      if (head.length < 4) {
        head = Buffer.concat([head, chunk.subarray(0, 4 - head.length)]);
        if (head.length >= 4 && !head.equals(ZIP_SIGNATURE)) {
          const type = String(res.headers['content-type'] ?? 'unknown type');
          return finish(
            new StopspanError('download-failed', `cannot download the feed: the body is not a zip archive (${type})`, { file: url }),
          );
        }
      }
      if (!out.write(chunk)) {
        res.pause();
        out.once('drain', () => res.resume());
      }
      if (onProgress && bytes - lastReport >= 1 << 20) {
        lastReport = bytes;
        onProgress({ stage: 'download', done: bytes, total, unit: 'bytes' });
      }
    });
    res.on('end', () => {
      if (done) return;
      if (head.length < 4)
        return finish(
          new StopspanError('download-failed', 'cannot download the feed: the body is not a zip archive (too short)', { file: url }),
        );
      finish(null);
    });
    res.on('error', (err) => finish(new StopspanError('download-failed', `cannot download the feed: ${err.message}`, { file: url })));
    res.on('aborted', () =>
      finish(new StopspanError('download-failed', 'cannot download the feed: connection closed early', { file: url })),
    );
    out.on('error', (err) => finish(new StopspanError('download-failed', `cannot save the download: ${err.message}`, { file: url })));
  });
}
