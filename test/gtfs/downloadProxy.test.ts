// Downloads through a proxy named in the environment, and the user's extra headers, against loopback
// servers only: a local forward proxy (absolute-form requests for http, CONNECT tunnels for https), a
// local https server whose self-signed certificate is made with openssl at test time (the https cases
// are skipped, saying so, when openssl cannot make one), no_proxy, Proxy-Authorization, the deadline
// across a proxy that never answers, and headers kept from another host after a redirect.

import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import http from 'node:http';
import https from 'node:https';
import net from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { downloadFeed, type DownloadOptions } from '../../src/gtfs/download.js';
import { bypassed, parseProxy } from '../../src/gtfs/httpProxy.js';
import { parseHeaderOptions, sameTrust } from '../../src/gtfs/requestHeaders.js';
import { rejected, thrown } from '../helpers/errors.js';
import { zipBytes } from '../helpers/zip.js';
import { listenLoopback } from '../helpers/loopback.js';

const SECRET = 'k3y-7f1c-not-for-print';
let feed: Buffer;
let dir = '';
const servers: net.Server[] = [];
const sockets = new Set<net.Socket>();

/** What each server saw. */
let seenByOrigin: { url: string; headers: http.IncomingHttpHeaders }[] = [];
let seenByOther: http.IncomingHttpHeaders[] = [];
let seenByProxy: { method: string; target: string; auth?: string }[] = [];

let origin = ''; // http://127.0.0.1:P
let other = ''; // http://127.0.0.2:P, another host
let proxyUrl = ''; // http://127.0.0.1:P
let silentProxy = ''; // accepts, never answers
let secureOrigin = ''; // https://127.0.0.1:P, when a certificate could be made
let cert: string | null = null;
let certWhyNot = '';

function listen(server: net.Server, host = '127.0.0.1'): Promise<number> {
  servers.push(server);
  server.on('connection', (s: net.Socket) => {
    sockets.add(s);
    s.on('close', () => sockets.delete(s));
  });
  return listenLoopback(server, host).then((base) => Number(new URL(base).port));
}

function originHandler(req: http.IncomingMessage, res: http.ServerResponse): void {
  seenByOrigin.push({ url: req.url ?? '', headers: req.headers });
  if (req.url === '/away') return void res.writeHead(302, { location: `${other}/feed.zip` }).end();
  if (req.url === '/away-and-back') return void res.writeHead(302, { location: `${other}/back` }).end();
  if (req.url === '/here') return void res.writeHead(302, { location: '/feed.zip' }).end();
  res.writeHead(200, { 'content-type': 'application/zip', 'content-length': feed.length });
  res.end(feed);
}

/** A forward proxy: absolute-form requests are relayed; CONNECT opens a tunnel. Credentials user:p@ss are required when asked. */
function makeProxy(requireAuth: () => boolean): http.Server {
  const expected = `Basic ${Buffer.from('user:p@ss').toString('base64')}`;
  const proxy = http.createServer((req, res) => {
    const auth = req.headers['proxy-authorization'];
    seenByProxy.push({ method: req.method ?? '', target: req.url ?? '', auth });
    if (requireAuth() && auth !== expected) return void res.writeHead(407, { 'proxy-authenticate': 'Basic' }).end();
    const headers = { ...req.headers };
    delete headers['proxy-authorization'];
    const upstream = http.get(req.url ?? '', { headers, agent: false }, (up) => {
      res.writeHead(up.statusCode ?? 502, up.headers);
      up.pipe(res);
    });
    upstream.on('error', () => res.writeHead(502).end());
  });
  proxy.on('connect', (req: http.IncomingMessage, client: net.Socket, head: Buffer) => {
    const auth = req.headers['proxy-authorization'];
    seenByProxy.push({ method: 'CONNECT', target: req.url ?? '', auth });
    if (requireAuth() && auth !== expected) return void client.end('HTTP/1.1 407 Proxy Authentication Required\r\n\r\n');
    const [host, port] = (req.url ?? '').split(':');
    const up = net.connect(Number(port), host, () => {
      client.write('HTTP/1.1 200 Connection Established\r\n\r\n');
      if (head.length) up.write(head);
      up.pipe(client);
      client.pipe(up);
    });
    up.on('error', () => client.destroy());
    client.on('error', () => up.destroy());
  });
  return proxy;
}

function makeCertificate(): void {
  const certDir = mkdtempSync(join(tmpdir(), 'stopspan-cert-'));
  try {
    execFileSync(
      'openssl',
      [
        'req',
        '-x509',
        '-newkey',
        'rsa:2048',
        '-nodes',
        '-days',
        '1',
        '-subj',
        '/CN=127.0.0.1',
        '-addext',
        'subjectAltName=IP:127.0.0.1',
        '-keyout',
        join(certDir, 'key.pem'),
        '-out',
        join(certDir, 'cert.pem'),
      ],
      { stdio: 'ignore', timeout: 30_000 },
    );
    cert = readFileSync(join(certDir, 'cert.pem'), 'utf8');
    key = readFileSync(join(certDir, 'key.pem'), 'utf8');
  } catch (e) {
    certWhyNot = `openssl could not make a certificate (${(e as Error).message.split('\n')[0]})`;
  } finally {
    rmSync(certDir, { recursive: true, force: true });
  }
}
let key = '';

let proxyNeedsAuth = false;

beforeAll(async () => {
  feed = await zipBytes({ 'agency.txt': 'agency_id,agency_name\nA,Vellmoor Transit\n' });
  origin = `http://127.0.0.1:${await listen(http.createServer(originHandler))}`;
  other = `http://127.0.0.2:${await listen(
    http.createServer((req, res) => {
      seenByOther.push(req.headers);
      if (req.url === '/back') return void res.writeHead(302, { location: `${origin}/feed.zip` }).end();
      res.writeHead(200, { 'content-type': 'application/zip', 'content-length': feed.length });
      res.end(feed);
    }),
    '127.0.0.2',
  )}`;
  proxyUrl = `http://127.0.0.1:${await listen(makeProxy(() => proxyNeedsAuth))}`;
  silentProxy = `http://127.0.0.1:${await listen(net.createServer(() => undefined))}`;
  makeCertificate();
  if (cert) secureOrigin = `https://127.0.0.1:${await listen(https.createServer({ cert, key }, originHandler))}`;
});

afterAll(async () => {
  for (const s of sockets) s.destroy();
  await Promise.all(servers.map((s) => new Promise((resolve) => s.close(resolve))));
});

beforeEach(() => {
  seenByOrigin = [];
  seenByOther = [];
  seenByProxy = [];
  proxyNeedsAuth = false;
  dir = mkdtempSync(join(tmpdir(), 'stopspan-proxy-test-'));
  return () => rmSync(dir, { recursive: true, force: true });
});

async function body(url: string, options: DownloadOptions): Promise<Buffer> {
  const dl = await downloadFeed(url, { cache: false, ...options });
  try {
    return readFileSync(dl.path);
  } finally {
    await dl.cleanup();
  }
}

describe('downloads through a proxy', () => {
  it('sends an http URL to the proxy in absolute form', async () => {
    const got = await body(`${origin}/feed.zip`, { env: { HTTP_PROXY: proxyUrl } });
    expect(got.equals(feed)).toBe(true);
    expect(seenByProxy).toEqual([{ method: 'GET', target: `${origin}/feed.zip`, auth: undefined }]);
  });

  it('sends Proxy-Authorization from the proxy URL, and names a refusal without the password', async () => {
    proxyNeedsAuth = true;
    const withAuth = proxyUrl.replace('//', '//user:p%40ss@');
    const got = await body(`${origin}/feed.zip`, { env: { http_proxy: withAuth } });
    expect(got.equals(feed)).toBe(true);
    expect(seenByProxy[0]?.auth).toBe(`Basic ${Buffer.from('user:p@ss').toString('base64')}`);
    expect(seenByOrigin[0]?.headers['proxy-authorization']).toBeUndefined();
    const e = await rejected(downloadFeed(`${origin}/feed.zip`, { cache: false, env: { http_proxy: proxyUrl } }));
    expect(e.code).toBe('download-failed');
    expect(e.message).toContain('407');
    const wrong = await rejected(
      downloadFeed(`${origin}/feed.zip`, { cache: false, env: { http_proxy: proxyUrl.replace('//', '//user:wrong-pass@') } }),
    );
    expect(wrong.oneLine()).not.toContain('wrong-pass');
  });

  it('goes direct for a host that no_proxy names', async () => {
    const got = await body(`${origin}/feed.zip`, { env: { HTTP_PROXY: proxyUrl, NO_PROXY: 'example.org, 127.0.0.1' } });
    expect(got.equals(feed)).toBe(true);
    expect(seenByProxy).toEqual([]);
    await body(`${origin}/feed.zip`, { env: { HTTP_PROXY: proxyUrl, no_proxy: '*' } });
    expect(seenByProxy).toEqual([]);
  });

  it('keeps the deadline across a proxy that never answers', async () => {
    const e = await rejected(
      downloadFeed(`${origin}/feed.zip`, { cache: false, env: { HTTP_PROXY: silentProxy }, limits: { timeoutMs: 300 } }),
    );
    expect(e.message).toContain('timed out');
    expect(e.message).toContain('through the proxy 127.0.0.1');
    const tunnel = await rejected(
      downloadFeed('https://127.0.0.1:9/feed.zip', { cache: false, env: { HTTPS_PROXY: silentProxy }, limits: { timeoutMs: 300 } }),
    );
    expect(tunnel.message).toContain('timed out');
  });

  it('refuses a proxy that is not http://, naming the variable', async () => {
    const e = await rejected(downloadFeed(`${origin}/feed.zip`, { cache: false, env: { HTTP_PROXY: 'socks5://127.0.0.1:1080' } }));
    expect(e.code).toBe('download-failed');
    expect(e.oneLine()).toContain('HTTP_PROXY');
    expect(e.oneLine()).toContain(`${origin}/feed.zip`);
  });

  it('tunnels an https URL through CONNECT, TLS end to end', async (ctx) => {
    if (!cert) return ctx.skip(certWhyNot || 'no certificate could be made for the local https server');
    proxyNeedsAuth = true;
    const withAuth = proxyUrl.replace('//', '//user:p%40ss@');
    const got = await body(`${secureOrigin}/feed.zip`, { env: { HTTPS_PROXY: withAuth }, ca: cert, headers: { 'x-api-key': SECRET } });
    expect(got.equals(feed)).toBe(true);
    expect(seenByProxy).toHaveLength(1);
    expect(seenByProxy[0]).toMatchObject({ method: 'CONNECT', target: secureOrigin.replace('https://', '') });
    expect(seenByProxy[0]?.auth).toBe(`Basic ${Buffer.from('user:p@ss').toString('base64')}`);
    expect(seenByOrigin[0]?.headers['x-api-key']).toBe(SECRET); // inside the tunnel, not seen by the proxy
    // a certificate the client does not trust fails the download, through the tunnel too
    const untrusted = await rejected(downloadFeed(`${secureOrigin}/feed.zip`, { cache: false, env: { HTTPS_PROXY: withAuth } }));
    expect(untrusted.code).toBe('download-failed');
    // and without the proxy, the same server is reached directly
    seenByProxy = [];
    expect((await body(`${secureOrigin}/feed.zip`, { ca: cert, env: {} })).equals(feed)).toBe(true);
    expect(seenByProxy).toEqual([]);
  });

  it('reads no_proxy entries as hosts, domains and ports', () => {
    const u = (s: string) => new URL(s);
    expect(bypassed(u('https://feeds.example.org/x'), 'example.org')).toBe(true);
    expect(bypassed(u('https://feeds.example.org/x'), '.example.org')).toBe(true);
    expect(bypassed(u('https://feeds.example.org/x'), '*.example.org')).toBe(true);
    expect(bypassed(u('https://badexample.org/x'), 'example.org')).toBe(false);
    expect(bypassed(u('https://example.org/x'), 'example.org:8443')).toBe(false);
    expect(bypassed(u('https://example.org:8443/x'), 'example.org:8443')).toBe(true);
    expect(bypassed(u('http://[::1]:8080/x'), '::1')).toBe(true);
    expect(bypassed(u('http://10.1.2.3/x'), '1.2.3')).toBe(false);
    expect(bypassed(u('http://a.b/x'), ' , ')).toBe(false);
    expect(parseProxy('proxy.local:3128', 'HTTP_PROXY')).toMatchObject({ host: 'proxy.local', port: 3128 });
  });
});

describe('the user headers', () => {
  it('reach the URL host, and follow a redirect on the same host', async () => {
    await body(`${origin}/here`, { headers: { 'X-Api-Key': SECRET } });
    expect(seenByOrigin.map((s) => s.headers['x-api-key'])).toEqual([SECRET, SECRET]);
  });

  it('are not sent to another host after a redirect', async () => {
    const got = await body(`${origin}/away`, {
      headers: [
        ['X-Api-Key', SECRET],
        ['Authorization', `Bearer ${SECRET}`],
      ],
    });
    expect(got.equals(feed)).toBe(true);
    expect(seenByOrigin[0]?.headers['x-api-key']).toBe(SECRET);
    expect(seenByOrigin[0]?.headers.authorization).toBe(`Bearer ${SECRET}`);
    expect(seenByOther).toHaveLength(1);
    expect(seenByOther[0]?.['x-api-key']).toBeUndefined();
    expect(seenByOther[0]?.authorization).toBeUndefined();
  });

  it('stay behind for good once a redirect has left the host, even when a later one comes back', async () => {
    await body(`${origin}/away-and-back`, { headers: { 'X-Api-Key': SECRET } });
    expect(seenByOrigin.map((s) => [s.url, s.headers['x-api-key']])).toEqual([
      ['/away-and-back', SECRET],
      ['/feed.zip', undefined],
    ]);
    expect(seenByOther[0]?.['x-api-key']).toBeUndefined();
  });

  it('go through the proxy with an http URL, and are refused when malformed without their value printed', async () => {
    await body(`${origin}/feed.zip`, { env: { HTTP_PROXY: proxyUrl }, headers: { 'X-Api-Key': SECRET } });
    expect(seenByOrigin[0]?.headers['x-api-key']).toBe(SECRET);
    for (const spec of [`X-Api-Key ${SECRET}`, `X Api:${SECRET}`, `X-Api-Key:${SECRET}\r\nX-Evil: 1`, `Host:${SECRET}`]) {
      const e = thrown(() => parseHeaderOptions([spec]));
      expect(e.code).toBe('bad-option');
      expect(e.oneLine()).not.toContain(SECRET);
      expect(e.oneLine()).not.toMatch(/[\r\n]/);
    }
    expect(parseHeaderOptions(['X-Key: a', 'x-key:b'])).toEqual({ 'x-key': 'a, b' });
    const e = await rejected(downloadFeed(`${origin}/feed.zip`, { headers: { 'X-Key': `${SECRET}\n` } }));
    expect(e.code).toBe('bad-option');
    expect(e.oneLine()).not.toContain(SECRET);
  });

  it('stay on the host the user named, and off plain http after https', () => {
    const u = (s: string) => new URL(s);
    expect(sameTrust(u('https://a.example/x'), u('https://a.example:8443/y'))).toBe(true);
    expect(sameTrust(u('http://a.example/x'), u('https://a.example/y'))).toBe(true);
    expect(sameTrust(u('https://a.example/x'), u('http://a.example/y'))).toBe(false);
    expect(sameTrust(u('https://a.example/x'), u('https://cdn.a.example/y'))).toBe(false);
  });
});
