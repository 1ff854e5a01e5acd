// The download cache against a loopback server (127.0.0.1 only) that counts requests and bodies sent: an
// ETag answered 304, a Last-Modified answered 304, a server with neither (fetched whole every time), a
// new ETag replacing the entry, a truncated entry not trusted, the cache turned off, the oldest entries
// evicted past the bound (and nothing else in the folder touched), and a folder that cannot be written.

import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, truncateSync, utimesSync, writeFileSync } from 'node:fs';
import http from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { downloadFeed, type DownloadOptions } from '../../src/gtfs/download.js';
import { cacheFolder, entryKey } from '../../src/gtfs/downloadCache.js';
import { WarningSink } from '../../src/common/warnings.js';
import { zipBytes } from '../helpers/zip.js';
import { rejected } from '../helpers/errors.js';
import { listenLoopback } from '../helpers/loopback.js';

let server: http.Server;
let base = '';
let feedA: Buffer;
let feedB: Buffer;
let requests: { path: string; ifNoneMatch?: string; ifModifiedSince?: string }[] = [];
let bodiesSent = 0;
let version = 1; // the /changing feed's version
const LAST_MODIFIED = 'Tue, 01 Dec 2026 10:00:00 GMT';
let dir = '';

const send = (res: http.ServerResponse, body: Buffer, headers: Record<string, string> = {}) => {
  bodiesSent++;
  res.writeHead(200, { 'content-type': 'application/zip', 'content-length': body.length, ...headers });
  res.end(body);
};

beforeAll(async () => {
  feedA = await zipBytes({ 'agency.txt': 'agency_id,agency_name\nA,Vellmoor Transit\n' });
  feedB = await zipBytes({ 'agency.txt': 'agency_id,agency_name\nA,Vellmoor Transit (winter)\n' });
  server = http.createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://x');
    const inm = req.headers['if-none-match'];
    const ims = req.headers['if-modified-since'];
    requests.push({ path: url.pathname, ifNoneMatch: inm, ifModifiedSince: ims });
    switch (url.pathname) {
      case '/etag.zip':
        if (inm === '"v1"') return void res.writeHead(304, { etag: '"v1"' }).end();
        return send(res, feedA, { etag: '"v1"' });
      case '/modified.zip':
        if (ims === LAST_MODIFIED) return void res.writeHead(304).end();
        return send(res, feedA, { 'last-modified': LAST_MODIFIED });
      case '/plain.zip':
        return send(res, feedA);
      case '/changing.zip': {
        const etag = `"v${version}"`;
        if (inm === etag) return void res.writeHead(304, { etag }).end();
        return send(res, version === 1 ? feedA : feedB, { etag });
      }
      default:
        res.writeHead(404).end();
    }
  });
  base = await listenLoopback(server);
});

afterAll(async () => {
  await new Promise((resolve) => server.close(resolve));
});

beforeEach(() => {
  requests = [];
  bodiesSent = 0;
  version = 1;
  dir = mkdtempSync(join(tmpdir(), 'stopspan-cache-test-'));
  return () => rmSync(dir, { recursive: true, force: true });
});

/** Downloads url with the test's cache folder; returns the body read and whether it came from the cache. */
async function fetchOnce(url: string, options: DownloadOptions = {}): Promise<{ body: Buffer; fromCache: boolean }> {
  const dl = await downloadFeed(url, { cache: { dir }, ...options });
  try {
    return { body: readFileSync(dl.path), fromCache: dl.fromCache };
  } finally {
    await dl.cleanup();
  }
}

const entries = () => readdirSync(dir).filter((n) => /^[0-9a-f]{64}$/.test(n));

describe('the download cache', () => {
  it('reuses the kept copy when the server answers 304 to If-None-Match', async () => {
    const first = await fetchOnce(`${base}/etag.zip`);
    const second = await fetchOnce(`${base}/etag.zip`);
    expect(first.fromCache).toBe(false);
    expect(second.fromCache).toBe(true);
    expect(second.body.equals(feedA)).toBe(true);
    expect(requests.map((r) => r.ifNoneMatch)).toEqual([undefined, '"v1"']);
    expect(bodiesSent).toBe(1);
    const meta = JSON.parse(readFileSync(join(dir, entryKey(`${base}/etag.zip`), 'entry.json'), 'utf8'));
    expect(meta).toMatchObject({ url: `${base}/etag.zip`, etag: '"v1"', bytes: feedA.length });
  });

  it('revalidates with If-Modified-Since when the server gave Last-Modified', async () => {
    await fetchOnce(`${base}/modified.zip`);
    const second = await fetchOnce(`${base}/modified.zip`);
    expect(second.fromCache).toBe(true);
    expect(second.body.equals(feedA)).toBe(true);
    expect(requests.map((r) => r.ifModifiedSince)).toEqual([undefined, LAST_MODIFIED]);
    expect(bodiesSent).toBe(1);
  });

  it('fetches a feed whole every time when the server gives neither validator, and keeps nothing', async () => {
    expect((await fetchOnce(`${base}/plain.zip`)).fromCache).toBe(false);
    expect((await fetchOnce(`${base}/plain.zip`)).fromCache).toBe(false);
    expect(bodiesSent).toBe(2);
    expect(requests.every((r) => r.ifNoneMatch === undefined && r.ifModifiedSince === undefined)).toBe(true);
    expect(entries()).toEqual([]);
  });

  it('replaces the entry when the server answers 200 with a new ETag', async () => {
    await fetchOnce(`${base}/changing.zip`);
    version = 2;
    const changed = await fetchOnce(`${base}/changing.zip`);
    expect(changed.fromCache).toBe(false);
    expect(changed.body.equals(feedB)).toBe(true);
    const again = await fetchOnce(`${base}/changing.zip`);
    expect(again.fromCache).toBe(true);
    expect(again.body.equals(feedB)).toBe(true);
    expect(requests.map((r) => r.ifNoneMatch)).toEqual([undefined, '"v1"', '"v2"']);
    expect(entries()).toHaveLength(1);
    expect(readdirSync(dir).filter((n) => n.startsWith('.'))).toEqual([]); // no working folder left
  });

  it('does not trust an entry whose body was cut short, nor one without its description', async () => {
    await fetchOnce(`${base}/etag.zip`);
    const entry = join(dir, entryKey(`${base}/etag.zip`));
    truncateSync(join(entry, 'feed.zip'), feedA.length - 10);
    const afterCut = await fetchOnce(`${base}/etag.zip`);
    expect(afterCut.fromCache).toBe(false);
    expect(afterCut.body.equals(feedA)).toBe(true);
    expect(requests[1]?.ifNoneMatch).toBeUndefined(); // the cut entry was not offered for revalidation
    // the entry was replaced whole: the next run reuses it
    expect((await fetchOnce(`${base}/etag.zip`)).fromCache).toBe(true);
    rmSync(join(entry, 'entry.json'));
    expect((await fetchOnce(`${base}/etag.zip`)).fromCache).toBe(false);
  });

  it('does not reuse a kept copy larger than the cap of this download', async () => {
    await fetchOnce(`${base}/etag.zip`);
    const e = await rejected(downloadFeed(`${base}/etag.zip`, { cache: { dir }, limits: { maxBytes: feedA.length - 1 } }));
    expect(e.message).toContain('exceeds the cap');
    expect(requests[1]?.ifNoneMatch).toBeUndefined();
  });

  it('neither reads nor writes the cache when it is turned off', async () => {
    await fetchOnce(`${base}/etag.zip`);
    const off = await fetchOnce(`${base}/etag.zip`, { cache: false, env: { STOPSPAN_CACHE_DIR: dir } });
    expect(off.fromCache).toBe(false);
    expect(requests[1]?.ifNoneMatch).toBeUndefined();
    rmSync(join(dir, entryKey(`${base}/etag.zip`)), { recursive: true });
    await fetchOnce(`${base}/etag.zip`, { cache: false });
    expect(entries()).toEqual([]);
  });

  it('keeps the most recently used entries within the bound and touches nothing else in the folder', async () => {
    writeFileSync(join(dir, 'notes.txt'), 'mine');
    mkdirSync(join(dir, 'a'.repeat(64))); // named like an entry, but holding something else
    writeFileSync(join(dir, 'a'.repeat(64), 'photo.jpg'), 'mine');
    const url = (k: number) => `${base}/etag.zip?k=${k}`;
    const past = (s: number) => new Date(Date.now() - s * 1000);
    await fetchOnce(url(1), { cache: { dir, maxEntries: 2 } });
    utimesSync(join(dir, entryKey(url(1))), past(300), past(300));
    await fetchOnce(url(2), { cache: { dir, maxEntries: 2 } });
    utimesSync(join(dir, entryKey(url(2))), past(200), past(200));
    // a reuse marks the entry used: 1 is now more recent than 2
    expect((await fetchOnce(url(1), { cache: { dir, maxEntries: 2 } })).fromCache).toBe(true);
    await fetchOnce(url(3), { cache: { dir, maxEntries: 2 } });
    expect(existsSync(join(dir, entryKey(url(1))))).toBe(true);
    expect(existsSync(join(dir, entryKey(url(2))))).toBe(false);
    expect(existsSync(join(dir, entryKey(url(3))))).toBe(true);
    expect(readFileSync(join(dir, 'notes.txt'), 'utf8')).toBe('mine');
    expect(readFileSync(join(dir, 'a'.repeat(64), 'photo.jpg'), 'utf8')).toBe('mine');
  });

  it('keeps no feed larger than the byte bound', async () => {
    await fetchOnce(`${base}/etag.zip`, { cache: { dir, maxBytes: feedA.length - 1 } });
    expect(entries()).toEqual([]);
  });

  it('downloads as without a cache when its folder cannot be written, and counts a warning', async () => {
    const file = join(dir, 'a-file');
    writeFileSync(file, 'not a folder');
    const warnings = new WarningSink();
    const got = await fetchOnce(`${base}/etag.zip`, { cache: { dir: join(file, 'cache') }, warnings });
    expect(got.body.equals(feedA)).toBe(true);
    expect(warnings.list().map((w) => [w.code, w.count])).toEqual([['download-cache-unusable', 1]]);
  });

  it('removes working folders left by a run that was killed, and never trusts them', async () => {
    await fetchOnce(`${base}/etag.zip`);
    const left = join(dir, '.tmp-999999999-0123456789ab');
    mkdirSync(left);
    writeFileSync(join(left, 'feed.zip'), feedA.subarray(0, 8));
    await fetchOnce(`${base}/plain.zip?x`, { cache: { dir } });
    await fetchOnce(`${base}/changing.zip`);
    expect(existsSync(left)).toBe(false);
  });

  it('finds its folder from the environment', () => {
    expect(cacheFolder({ STOPSPAN_CACHE_DIR: '/srv/c', XDG_CACHE_HOME: '/x' })).toBe('/srv/c');
    expect(cacheFolder({ XDG_CACHE_HOME: '/x' })).toBe(join('/x', 'stopspan'));
    expect(cacheFolder({ XDG_CACHE_HOME: 'relative' })).toMatch(/\.cache[/\\]stopspan$/);
  });
});
