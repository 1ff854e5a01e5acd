// Fetches a feed from an http(s) URL into a private temporary file, bounded in redirects, time and size,
// and checks that the body starts like a zip archive before anyone opens it. The caller removes the file;
// an interrupt removes it too (common/interrupts.ts), and a folder left by a run that was killed outright
// (its pid no longer alive) is removed by the next download. A feed fetched before is asked for again
// with its validators and reused from the download cache on a 304 (downloadCache.ts); the request goes
// through the proxy the environment names (httpProxy.ts), with the user's extra headers kept to the host
// the user named (requestHeaders.ts).

import { createWriteStream, rmSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import type http from 'node:http';
import { isIP } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { StopspanError } from '../common/errors.js';
import { staleRunFolders, undoOnInterrupt } from '../common/interrupts.js';
import type { OnProgress } from '../common/progress.js';
import type { WarningSink } from '../common/warnings.js';
import {
  DEFAULT_CACHE_LIMITS,
  ZIP_HEAD,
  cacheFolder,
  copyOut,
  readEntry,
  storeEntry,
  validators,
  type CacheOptions,
} from './downloadCache.js';
import { proxyFor, unbracketed, type Proxy, type ProxyEnv } from './httpProxy.js';
import { basicAuth, checkHeaders, sameTrust, shownUrl, type RequestHeaders } from './requestHeaders.js';

export interface DownloadLimits {
  /** Redirects followed before giving up. Default 5. */
  maxRedirects?: number;
  /** Whole-download deadline in milliseconds (connect, headers and body). Default 120 000. */
  timeoutMs?: number;
  /** Largest body accepted, in bytes. Default 1 GiB. */
  maxBytes?: number;
}

/** How a feed is fetched, besides its limits. */
export interface FetchOptions {
  /** Extra request headers (e.g. an API key), sent to the URL's own host only; checked as --header is. */
  headers?: RequestHeaders | readonly (readonly [string, string])[];
  /** The download cache: false turns it off; default on, in the folder cacheFolder names. */
  cache?: boolean | CacheOptions;
  /** Where the proxy and cache folder variables are read. Default process.env. */
  env?: ProxyEnv;
  /** Certificates trusted besides the system's (PEM), for https servers and tunnels. */
  ca?: string | Buffer | (string | Buffer)[];
}

export interface DownloadOptions extends FetchOptions {
  limits?: DownloadLimits;
  onProgress?: OnProgress;
  /** Where a cache that cannot be used is counted (download-cache-unusable); the download goes on without it. */
  warnings?: WarningSink;
}

export interface DownloadedFile {
  path: string;
  bytes: number;
  /** Whether the body is the cached copy, the server having answered 304 Not Modified. */
  fromCache: boolean;
  /** Removes the temporary file and its folder; safe to call twice. */
  cleanup: () => Promise<void>;
}

export const DEFAULT_DOWNLOAD_LIMITS: Required<DownloadLimits> = {
  maxRedirects: 5,
  timeoutMs: 120_000,
  maxBytes: 1024 * 1024 * 1024,
};

export function isUrl(source: string): boolean {
  return /^https?:\/\//i.test(source);
}

interface DownloadJob {
  url: string;
  shown: string;
  limits: Required<DownloadLimits>;
  deadline: number;
  headers: RequestHeaders;
  env: ProxyEnv;
  ca?: FetchOptions['ca'];
  onProgress?: OnProgress;
}

/** Downloads url to a temporary file. Throws StopspanError 'download-failed' with the reason. */
export async function downloadFeed(url: string, options: DownloadOptions = {}): Promise<DownloadedFile> {
  const { limits = {}, onProgress, cache = true, env = process.env, ca, warnings } = options;
  const lim = { ...DEFAULT_DOWNLOAD_LIMITS, ...limits };
  const { maxRedirects, timeoutMs, maxBytes } = lim;
  if (typeof url !== 'string' || !isUrl(url))
    throw new StopspanError('bad-option', 'invalid option source: expected an http(s) URL', { value: shownUrl(String(url)) });
  if (!(maxRedirects >= 0))
    throw new StopspanError('bad-option', 'invalid option maxRedirects: expected >= 0', { value: String(maxRedirects) });
  if (!(timeoutMs > 0)) throw new StopspanError('bad-option', 'invalid option timeoutMs: expected > 0', { value: String(timeoutMs) });
  if (!(maxBytes > 0)) throw new StopspanError('bad-option', 'invalid option maxBytes: expected > 0', { value: String(maxBytes) });
  const headers = checkHeaders(options.headers);
  const store = cacheSettings(cache, env);

  await sweepStaleDownloads();
  const dir = await mkdtemp(join(tmpdir(), `${DOWNLOAD_PREFIX}${process.pid}-`));
  const path = join(dir, 'feed.zip');
  const forget = undoOnInterrupt(() => rmSync(dir, { recursive: true, force: true }));
  const cleanup = async (): Promise<void> => {
    await rm(dir, { recursive: true, force: true });
    forget();
  };
  const job: DownloadJob = { url, shown: shownUrl(url), limits: lim, deadline: Date.now() + timeoutMs, headers, env, ca, onProgress };
  try {
    const kept = store ? await readEntry(store.dir, url) : null;
    const entry = kept && kept.meta.bytes <= maxBytes ? kept : null; // a copy over today's cap is not reused
    let got = await fetchTo(job, path, validators(entry));
    if (got.notModified && entry) {
      try {
        await copyOut(entry, path);
        return { path, bytes: entry.meta.bytes, fromCache: true, cleanup };
      } catch {
        // the kept copy went away or changed meanwhile: fetch the feed whole
        await rm(path, { force: true });
        got = await fetchTo(job, path, {});
      }
    }
    if (store) await keep(store, url, path, got, warnings);
    return { path, bytes: got.bytes, fromCache: false, cleanup };
  } catch (e) {
    await cleanup();
    throw e;
  }
}

interface CacheSettings {
  dir: string;
  limits: Required<Omit<CacheOptions, 'dir'>>;
}

function cacheSettings(cache: boolean | CacheOptions, env: ProxyEnv): CacheSettings | null {
  if (cache === false) return null;
  const o = cache === true ? {} : cache;
  const limits = {
    maxEntries: o.maxEntries ?? DEFAULT_CACHE_LIMITS.maxEntries,
    maxBytes: o.maxBytes ?? DEFAULT_CACHE_LIMITS.maxBytes,
  };
  for (const [k, v] of Object.entries(limits))
    if (!(Number.isSafeInteger(v) && v >= 1))
      throw new StopspanError('bad-option', `invalid option cache.${k}: expected a whole number >= 1`, { value: String(v) });
  return { dir: o.dir ?? cacheFolder(env), limits };
}

/** Keeps a fetched body in the cache when the server gave a validator; a cache that cannot be written is a warning. */
async function keep(store: CacheSettings, url: string, path: string, got: Fetched, warnings?: WarningSink): Promise<void> {
  if (!got.etag && !got.lastModified) return; // nothing to revalidate with: fetched whole every time
  try {
    await storeEntry(store.dir, url, path, { etag: got.etag, lastModified: got.lastModified, bytes: got.bytes }, store.limits);
  } catch (e) {
    warnings?.add('download-cache-unusable', `${store.dir}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
  }
}

interface Fetched {
  notModified: boolean;
  bytes: number;
  etag?: string;
  lastModified?: string;
}

/** Fetches the feed into path, following redirects; a 304 (only when `conditional` was sent) saves nothing. */
async function fetchTo(job: DownloadJob, path: string, conditional: Record<string, string>): Promise<Fetched> {
  const { url, shown, limits, deadline } = job;
  const first = new URL(url);
  let current = first;
  let trusted = true; // once a redirect has left the user's host, the user's headers stay behind for good
  for (let hop = 0; ; hop++) {
    trusted &&= sameTrust(first, current);
    const headers = { ...(trusted ? job.headers : {}), ...conditional };
    const res = await request(current, headers, job);
    const status = res.statusCode ?? 0;
    if (status === 304 && Object.keys(conditional).length > 0) {
      res.resume();
      return { notModified: true, bytes: 0 };
    }
    if (status >= 300 && status < 400 && res.headers.location) {
      res.resume();
      if (hop >= limits.maxRedirects) fail(shown, `more than ${limits.maxRedirects} redirects`);
      let next: URL;
      try {
        next = new URL(res.headers.location, current);
      } catch {
        fail(shown, 'redirect to an invalid URL');
      }
      if (next.protocol !== 'http:' && next.protocol !== 'https:') fail(shown, `redirect to a non-http URL ${next.protocol}`);
      current = next;
      continue;
    }
    if (status !== 200) {
      res.resume();
      fail(shown, status === 407 ? 'the proxy asked for credentials (HTTP status 407)' : `HTTP status ${status}`);
    }
    const declared = Number(res.headers['content-length']);
    if (Number.isFinite(declared) && declared > limits.maxBytes) {
      res.destroy();
      fail(shown, `body of ${declared} bytes exceeds the cap of ${limits.maxBytes} bytes`);
    }
    const bytes = await saveBody(res, path, {
      deadline,
      maxBytes: limits.maxBytes,
      url: shown,
      onProgress: job.onProgress,
      total: Number.isFinite(declared) ? declared : undefined,
    });
    return { notModified: false, bytes, etag: validator(res.headers.etag), lastModified: validator(res.headers['last-modified']) };
  }
}

/** A validator header worth keeping: present, short, one line. */
function validator(v: string | string[] | undefined): string | undefined {
  return typeof v === 'string' && v.length > 0 && v.length <= 1024 && /^[\t\x20-\x7e\x80-\xff]+$/.test(v) ? v : undefined;
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

function fail(shown: string, why: string): never {
  throw new StopspanError('download-failed', `cannot download the feed: ${why}`, { file: shown });
}

/** The http or https module, loaded on the first download: loading both costs every other run start-up time. */
async function client(protocol: string): Promise<typeof http> {
  return protocol === 'https:' ? ((await import('node:https')).default as unknown as typeof http) : (await import('node:http')).default;
}

type Settle = (err: StopspanError | null, res?: http.IncomingMessage) => void;

interface Attempt {
  target: URL;
  /** The request target without credentials. */
  plain: URL;
  headers: RequestHeaders;
  job: DownloadJob;
  /** Registers something to destroy if the attempt fails or times out. */
  track: <T extends { destroy(): unknown }>(x: T) => T;
  settle: Settle;
  failWith: (why: string) => void;
}

/**
 * Sends a GET for target, directly or through the proxy the environment names, and resolves with the
 * response head before the deadline. The URL's own user name and password go as Authorization.
 */
async function request(target: URL, extra: RequestHeaders, job: DownloadJob): Promise<http.IncomingMessage> {
  let proxy: Proxy | null;
  try {
    proxy = proxyFor(target, job.env);
  } catch (e) {
    fail(job.shown, (e as Error).message); // "cannot use the proxy in NAME: ..."
  }
  const headers: RequestHeaders = { 'user-agent': 'stopspan', accept: 'application/zip, */*', ...extra };
  const auth = basicAuth(target);
  if (auth && !Object.hasOwn(headers, 'authorization')) headers.authorization = auth;
  const plain = new URL(target);
  plain.username = '';
  plain.password = '';
  const via = proxy ? ` (through the proxy ${proxy.shown})` : '';
  const mod = await client(proxy ? 'http:' : target.protocol);
  const tls = proxy && target.protocol === 'https:' ? await import('node:tls') : null;
  return new Promise((resolve, reject) => {
    const tracked: { destroy(): unknown }[] = [];
    let settled = false;
    const settle: Settle = (err, res) => {
      if (settled) return void res?.destroy();
      settled = true;
      clearTimeout(timer);
      if (err || !res) {
        for (const t of tracked) t.destroy();
        reject(err);
      } else resolve(res);
    };
    const failWith = (why: string): void =>
      settle(new StopspanError('download-failed', `cannot download the feed: ${why}${via}`, { file: job.shown }));
    const left = job.deadline - Date.now();
    const timer = setTimeout(() => failWith('timed out waiting for a response'), Math.max(1, left));
    if (left <= 0) return failWith('timed out');
    const track = <T extends { destroy(): unknown }>(x: T): T => {
      tracked.push(x);
      return x;
    };
    const attempt: Attempt = { target, plain, headers, job, track, settle, failWith };
    if (!proxy) direct(mod, attempt);
    else if (tls) tunnel(mod, tls, proxy, attempt);
    else forward(mod, proxy, attempt);
  });
}

function direct(mod: typeof http, { plain, headers, job, track, settle, failWith }: Attempt): void {
  const req = track(mod.get(plain, { headers, ...(job.ca ? { ca: job.ca } : {}) }, (res) => settle(null, res)));
  req.on('error', (err) => failWith(err.message));
}

/** An http URL through the proxy: the request line names the whole URL (absolute form). */
function forward(mod: typeof http, proxy: Proxy, { target, plain, headers, track, settle, failWith }: Attempt): void {
  const req = track(
    mod.get(
      {
        host: proxy.host,
        port: proxy.port,
        path: plain.href,
        headers: { ...headers, host: target.host, ...proxyAuth(proxy) },
      },
      (res) => settle(null, res),
    ),
  );
  req.on('error', (err) => failWith(err.message));
}

/** An https URL through the proxy: CONNECT opens a tunnel to the host, and TLS runs end to end inside it. */
function tunnel(mod: typeof http, tls: typeof import('node:tls'), proxy: Proxy, attempt: Attempt): void {
  const { target, plain, headers, job, track, settle, failWith } = attempt;
  const authority = `${target.hostname}:${target.port || 443}`;
  const connect = track(
    mod.request({
      host: proxy.host,
      port: proxy.port,
      method: 'CONNECT',
      path: authority,
      headers: { host: authority, ...proxyAuth(proxy) },
      agent: false,
    }),
  );
  connect.on('error', (err) => failWith(err.message));
  connect.on('connect', (res: http.IncomingMessage, socket: import('node:net').Socket, head: Buffer) => {
    track(socket);
    if (res.statusCode !== 200)
      return failWith(
        res.statusCode === 407
          ? 'the proxy asked for credentials (HTTP status 407)'
          : `the proxy refused the tunnel (HTTP status ${res.statusCode ?? 0})`,
      );
    if (head.length > 0) socket.unshift(head);
    const host = unbracketed(target.hostname);
    const secure = track(
      tls.connect({ socket, host, ...(isIP(host) === 0 ? { servername: host } : {}), ...(job.ca ? { ca: job.ca } : {}) }),
    );
    secure.on('error', (err) => failWith(err.message));
    const req = track(
      mod.request({
        host,
        port: Number(target.port || 443),
        method: 'GET',
        path: `${plain.pathname}${plain.search}`,
        headers: { ...headers, host: target.host },
        createConnection: () => secure,
      }),
    );
    req.on('response', (r) => settle(null, r));
    req.on('error', (err) => failWith(err.message));
    req.end();
  });
  connect.end();
}

function proxyAuth(proxy: Proxy): Record<string, string> {
  return proxy.authorization ? { 'proxy-authorization': proxy.authorization } : {};
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
        if (head.length >= 4 && !head.equals(ZIP_HEAD)) {
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
