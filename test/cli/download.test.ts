// The built command with a feed given as a URL, against loopback servers (127.0.0.1 and 127.0.0.2 as a
// second host): --header reaches the feed's host and not another host after a redirect, a malformed one
// is one line and exit 2 on every command that reads a feed (its value never printed), and --no-cache
// fetches the feed whole while the default revalidates it. The cache folder is a temporary one.

import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import http from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/cli.js';
import { BASIC, cleanupCopies, zipFolder } from '../gtfs/feedCopy.js';
import { listenLoopback } from '../helpers/loopback.js';

const SECRET = 'k3y-cli-7f1c-not-for-print';
let feed: Buffer;
let origin = '';
let other = '';
const servers: http.Server[] = [];
let seen: { host: string; url: string; headers: http.IncomingHttpHeaders }[] = [];
let cacheDir = '';
const savedCacheDir = process.env.STOPSPAN_CACHE_DIR;

function serve(host: string, name: string): Promise<string> {
  const server = http.createServer((req, res) => {
    seen.push({ host: name, url: req.url ?? '', headers: req.headers });
    if (req.url === '/away.zip') return void res.writeHead(302, { location: `${other}/feed.zip` }).end();
    if (req.url === '/missing.zip') return void res.writeHead(404).end();
    if (req.headers['if-none-match'] === '"basic-1"') return void res.writeHead(304, { etag: '"basic-1"' }).end();
    res.writeHead(200, { 'content-type': 'application/zip', 'content-length': feed.length, etag: '"basic-1"' });
    res.end(feed);
  });
  servers.push(server);
  return listenLoopback(server, host);
}

beforeAll(async () => {
  feed = readFileSync(await zipFolder(BASIC));
  origin = await serve('127.0.0.1', 'origin');
  other = await serve('127.0.0.2', 'other');
  cacheDir = mkdtempSync(join(tmpdir(), 'stopspan-cli-cache-'));
  process.env.STOPSPAN_CACHE_DIR = cacheDir; // the commands started below inherit it
});

afterAll(async () => {
  process.env.STOPSPAN_CACHE_DIR = savedCacheDir;
  rmSync(cacheDir, { recursive: true, force: true });
  await Promise.all(servers.map((s) => new Promise((resolve) => s.close(resolve))));
  cleanupCopies();
});

const check = (url: string, ...more: string[]) => runCli(['check', url, '--fail-on', 'never', '--today', '2026-10-14', ...more]);

describe('stopspan with a feed URL', () => {
  it('sends --header with the download, and not to another host after a redirect', async () => {
    seen = [];
    const direct = await check(`${origin}/feed.zip`, '--header', `X-Api-Key: ${SECRET}`, '--no-cache');
    expect(direct.code).toBe(0);
    expect(seen.map((s) => [s.host, s.headers['x-api-key']])).toEqual([['origin', SECRET]]);
    seen = [];
    const moved = await check(`${origin}/away.zip`, '--header', `X-Api-Key: ${SECRET}`, '--header', 'Accept-Language: en', '--no-cache');
    expect(moved.code).toBe(0);
    expect(seen.map((s) => [s.host, s.headers['x-api-key']])).toEqual([
      ['origin', SECRET],
      ['other', undefined],
    ]);
    expect(direct.stdout + direct.stderr + moved.stdout + moved.stderr).not.toContain(SECRET);
  });

  it('never prints a header value in a download error', async () => {
    const r = await check(`${origin}/missing.zip`, '--header', `X-Api-Key: ${SECRET}`);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('404');
    expect(r.stderr).not.toContain(SECRET);
  });

  it('refuses a malformed --header on every command that reads a feed: one line, exit 2, no value', async () => {
    const url = `${origin}/feed.zip`;
    const out = mkdtempSync(join(tmpdir(), 'stopspan-cli-out-'));
    try {
      for (const args of [
        ['check', url],
        ['audit', url, '--out', join(out, 'audit')],
        ['compare', url, url],
        ['whatif', url, '--remove', 'S1'],
      ]) {
        for (const bad of [`X-Api-Key ${SECRET}`, `X-Api-Key: ${SECRET}\nX-Evil: 1`]) {
          seen = [];
          const r = await runCli([...args, '--header', bad]);
          expect(r.code, args[0]).toBe(2);
          expect(r.stderr.trimEnd().split('\n'), args[0]).toHaveLength(1);
          expect(r.stderr).toMatch(/^error: invalid option --header/);
          expect(r.stderr).not.toContain(SECRET);
          expect(seen).toEqual([]); // refused before anything was fetched
        }
      }
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  });

  it('revalidates the kept copy by default, and fetches whole with --no-cache', async () => {
    seen = [];
    expect((await check(`${origin}/feed.zip?cached`)).code).toBe(0);
    const again = await check(`${origin}/feed.zip?cached`, '--json');
    expect(again.code).toBe(0);
    expect(JSON.parse(again.stdout)).toBeTypeOf('object');
    const off = await check(`${origin}/feed.zip?cached`, '--no-cache');
    expect(off.code).toBe(0);
    expect(seen.map((s) => s.headers['if-none-match'])).toEqual([undefined, '"basic-1"', undefined]);
  });
});
