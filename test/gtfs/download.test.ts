// Downloading a feed from a local http server on 127.0.0.1 (loopback only): a zip, a redirect chain, a
// redirect loop, a response that never finishes, an HTML page, bodies over the cap, an error status.

import { existsSync, readdirSync, readFileSync } from 'node:fs';
import http from 'node:http';
import { tmpdir } from 'node:os';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { downloadFeed } from '../../src/gtfs/download.js';
import { readFeed } from '../../src/gtfs/readFeed.js';
import { BASIC, cleanupCopies, zipFolder } from './feedCopy.js';
import { rejected } from '../helpers/errors.js';
import { listenLoopback } from '../helpers/loopback.js';

let server: http.Server;
let base = '';
let zipBytes: Buffer;
const hanging: http.ServerResponse[] = [];
const authorizations: (string | undefined)[] = [];

beforeAll(async () => {
  zipBytes = readFileSync(await zipFolder(BASIC));
  server = http.createServer((req, res) => {
    authorizations.push(req.headers.authorization);
    const url = new URL(req.url ?? '/', 'http://x');
    const hop = Number(url.searchParams.get('hop') ?? 0);
    switch (url.pathname) {
      case '/feed.zip':
        res.writeHead(200, { 'content-type': 'application/zip', 'content-length': zipBytes.length });
        res.end(zipBytes);
        return;
      case '/chain':
        if (hop < 3) res.writeHead(302, { location: `/chain?hop=${hop + 1}` }).end();
        else res.writeHead(301, { location: '/feed.zip' }).end();
        return;
      case '/loop':
        res.writeHead(302, { location: '/loop' }).end();
        return;
      case '/slow':
        res.writeHead(200, { 'content-type': 'application/zip' });
        res.write(zipBytes.subarray(0, 10)); // then nothing more
        hanging.push(res);
        return;
      case '/page.html':
        res.writeHead(200, { 'content-type': 'text/html' });
        res.end('<!doctype html><title>Vellmoor Transit open data</title><p>Download our feed here.</p>');
        return;
      case '/big-declared':
        res.writeHead(200, { 'content-type': 'application/zip', 'content-length': 50_000 });
        res.end(Buffer.concat([zipBytes.subarray(0, 4), Buffer.alloc(50_000 - 4)]));
        return;
      case '/big-chunked':
        res.writeHead(200, { 'content-type': 'application/zip' }); // no length: chunked
        res.write(zipBytes.subarray(0, 4));
        for (let k = 0; k < 10; k++) res.write(Buffer.alloc(5_000));
        res.end();
        return;
      default:
        res.writeHead(404).end('not here');
    }
  });
  base = await listenLoopback(server);
});

afterAll(async () => {
  for (const r of hanging) r.destroy();
  await new Promise((resolve) => server.close(resolve));
  cleanupCopies();
});

const ours = () =>
  readdirSync(tmpdir())
    .filter((n) => n.startsWith('stopspan-dl-'))
    .sort();

describe('downloadFeed', () => {
  it('saves a zip to a temporary file that cleanup removes', async () => {
    const dl = await downloadFeed(`${base}/feed.zip`);
    expect(readFileSync(dl.path).equals(zipBytes)).toBe(true);
    expect(dl.bytes).toBe(zipBytes.length);
    await dl.cleanup();
    expect(existsSync(dl.path)).toBe(false);
  });

  it('follows up to five redirects', async () => {
    const dl = await downloadFeed(`${base}/chain`);
    expect(dl.bytes).toBe(zipBytes.length);
    await dl.cleanup();
    const e = await rejected(downloadFeed(`${base}/chain`, { limits: { maxRedirects: 3 } }));
    expect(e.code).toBe('download-failed');
  });

  it('gives up on a redirect loop', async () => {
    const e = await rejected(downloadFeed(`${base}/loop`));
    expect(e.code).toBe('download-failed');
    expect(e.message).toContain('more than 5 redirects');
    expect(e.context.file).toBe(`${base}/loop`);
  });

  it('times out a response that never finishes', async () => {
    const e = await rejected(downloadFeed(`${base}/slow`, { limits: { timeoutMs: 300 } }));
    expect(e.code).toBe('download-failed');
    expect(e.message).toContain('timed out');
  });

  it('refuses an HTML page', async () => {
    const e = await rejected(downloadFeed(`${base}/page.html`));
    expect(e.code).toBe('download-failed');
    expect(e.oneLine()).toBe(`${base}/page.html: cannot download the feed: the body is not a zip archive (text/html)`);
  });

  it('refuses bodies over the cap, declared or not', async () => {
    const declared = await rejected(downloadFeed(`${base}/big-declared`, { limits: { maxBytes: 10_000 } }));
    expect(declared.code).toBe('download-failed');
    expect(declared.message).toContain('10000');
    const chunked = await rejected(downloadFeed(`${base}/big-chunked`, { limits: { maxBytes: 10_000 } }));
    expect(chunked.code).toBe('download-failed');
    expect(chunked.message).toContain('cap of 10000 bytes');
  });

  it('reports an error status', async () => {
    const e = await rejected(downloadFeed(`${base}/missing.zip`));
    expect(e.code).toBe('download-failed');
    expect(e.message).toContain('HTTP status 404');
  });

  it('keeps a user name and password in the URL out of messages and the feed source, and sends them as Authorization', async () => {
    const withCredentials = base.replace('//', '//planner:s3cr3t-pw@');
    const e = await rejected(downloadFeed(`${withCredentials}/page.html`, { cache: false }));
    expect(e.oneLine()).toBe(`${base}/page.html: cannot download the feed: the body is not a zip archive (text/html)`);
    const feed = await readFeed(`${withCredentials}/feed.zip`, { fetch: { cache: false } });
    expect(feed.source).toBe(`${base}/feed.zip`);
    expect(authorizations.at(-1)).toBe(`Basic ${Buffer.from('planner:s3cr3t-pw').toString('base64')}`);
  });

  it('leaves no temporary files behind, whether it succeeds or fails', async () => {
    const before = ours();
    await rejected(downloadFeed(`${base}/page.html`));
    await rejected(downloadFeed(`${base}/big-chunked`, { limits: { maxBytes: 10_000 } }));
    const feed = await readFeed(`${base}/feed.zip`);
    expect(feed.source).toBe(`${base}/feed.zip`);
    expect(feed.trips.size).toBe(4);
    expect(ours()).toEqual(before);
  });
});
