// The built CLI's check, compare and history commands: stdout, stderr and exit codes, on the fixture
// feeds of fixtures/check and a loopback server for URLs.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT, runCli } from '../helpers/cli.js';
import { checkExitCode } from '../../src/cli/check.js';
import type { Finding } from '../../src/audit/check.js';

const FIX = join(ROOT, 'fixtures/check');
const TODAY = '2026-10-14';
let dir: string;

const cli = (args: string[]) => runCli(args);

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'stopspan-cli-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const finding = (severity: Finding['severity']): Finding => ({ code: 'twin-stops', title: '', severity, explanation: '', count: 1, examples: [] });

describe('checkExitCode', () => {
  it('is 1 only when a finding at or above --fail-on exists (exit codes of DESIGN.md section 6)', () => {
    expect(checkExitCode({ findings: [] }, 'info')).toBe(0);
    expect(checkExitCode({ findings: [finding('warning')] }, 'error')).toBe(0);
    expect(checkExitCode({ findings: [finding('warning')] }, 'warning')).toBe(1);
    expect(checkExitCode({ findings: [finding('warning')] }, 'info')).toBe(1);
    expect(checkExitCode({ findings: [finding('error')] }, 'error')).toBe(1);
    expect(checkExitCode({ findings: [finding('error')] }, 'never')).toBe(0);
    expect(checkExitCode({ findings: [finding('info')] }, 'warning')).toBe(0);
  });
});

describe('stopspan check', () => {
  it('exits 0 and says so on the clean feed', async () => {
    const r = await cli(['check', join(FIX, 'clean'), '--today', TODAY]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('no findings');
    expect(r.stdout).toContain('0 error, 0 warning, 0 info finding(s)');
    expect(r.stderr).toBe('');
  });

  it('exits 1 on an error-level finding, with its explanation and an example', async () => {
    const r = await cli(['check', join(FIX, 'coordinate-fault'), '--today', TODAY]);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/^ERROR\s+coordinate-fault \(1\): A stop's coordinates are zero/m);
    expect(r.stdout).toMatch(/stops\.txt\s+stop Z0 at \(0, 0\): zero/);
  });

  it('--fail-on decides whether a warning fails the run', async () => {
    const feed = join(FIX, 'stop-off-path');
    expect((await cli(['check', feed, '--today', TODAY])).code).toBe(0);
    expect((await cli(['check', feed, '--today', TODAY, '--fail-on', 'warning'])).code).toBe(1);
    expect((await cli(['check', feed, '--today', TODAY, '--off-path-m', '500', '--fail-on', 'warning'])).code).toBe(0);
  });

  it('--json prints the report for machines', async () => {
    const r = await cli(['check', join(FIX, 'service-ending-soon'), '--today', TODAY, '--json']);
    expect(r.code).toBe(1);
    const doc = JSON.parse(r.stdout);
    expect(doc.tool.name).toBe('stopspan');
    expect(doc.counts['service-ending-soon']).toBe(1);
    expect(doc.findings[0]).toMatchObject({ code: 'service-ending-soon', severity: 'error', count: 1 });
    expect(doc.serviceEnd).toBe('2026-10-19');
    expect(doc.exitCode).toBe(1);
  });

  it('exits 2 with one line on stderr for unreadable input and bad options', async () => {
    const missing = await cli(['check', join(FIX, 'no-such-feed.zip')]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/^error: .+\n$/);
    const notZip = join(dir, 'not-a-zip.zip');
    writeFileSync(notZip, 'this is not a zip archive');
    const nz = await cli(['check', notZip]);
    expect(nz.code).toBe(2);
    expect(nz.stderr).toMatch(/^error: /);
    expect((await cli(['check', join(FIX, 'clean'), '--fail-on', 'sometimes'])).stderr).toMatch(/--fail-on: expected one of error, warning, info, never, got sometimes/);
    expect((await cli(['check', join(FIX, 'clean'), '--twin-stop-m', 'x'])).code).toBe(2);
    expect((await cli(['check', join(FIX, 'clean'), '--speed', 'bus=fast'])).code).toBe(2);
    expect((await cli(['check', join(FIX, 'clean'), '--today', 'tomorrow'])).code).toBe(2);
  });

  it('exits 2 when a URL gives a 404 or something that is not a zip (loopback server)', async () => {
    const server: Server = createServer((req, res) => {
      if (req.url === '/gtfs.zip') {
        res.writeHead(200, { 'content-type': 'application/zip' });
        res.end('<html>maintenance</html>');
      } else {
        res.writeHead(404);
        res.end();
      }
    });
    await new Promise<void>((ok) => server.listen(0, '127.0.0.1', ok));
    const port = (server.address() as AddressInfo).port;
    try {
      const notFound = await cli(['check', `http://127.0.0.1:${port}/missing.zip`]);
      expect(notFound.code).toBe(2);
      expect(notFound.stderr).toMatch(/^error: .*404/);
      const notZip = await cli(['check', `http://127.0.0.1:${port}/gtfs.zip`]);
      expect(notZip.code).toBe(2);
      expect(notZip.stderr).toMatch(/^error: /);
    } finally {
      server.close();
    }
  });

  it('--help lists every finding from the table', async () => {
    const r = await cli(['check', '--help']);
    expect(r.code).toBe(0);
    for (const code of ['twin-stops', 'stop-off-path', 'pathless-trip', 'distance-backtrack', 'time-backtrack', 'implausible-speed', 'coordinate-fault', 'service-ending-soon', 'dangling-reference']) {
      expect(r.stdout).toContain(code);
    }
  });
});

describe('stopspan check --history and stopspan history', () => {
  it('records one row per run, none for a failed run, and shows the trend', async () => {
    const db = join(dir, 'vellmoor.sqlite');
    expect((await cli(['check', join(FIX, 'clean'), '--today', '2026-10-13', '--history', db])).code).toBe(0);
    expect((await cli(['check', join(FIX, 'twin-stops'), '--today', TODAY, '--history', db])).code).toBe(0);
    expect((await cli(['check', join(FIX, 'no-such-feed'), '--today', TODAY, '--history', db])).code).toBe(2);
    const text = await cli(['history', db]);
    expect(text.code).toBe(0);
    const lines = text.stdout.split('\n\n')[0].trim().split('\n');
    expect(text.stdout).toMatch(/since the previous run \(2026-10-13\): new feed content\n  twin-stops \+1 \(now 1\)\n$/);
    expect(lines).toHaveLength(3); // header + two runs
    expect(lines[1]).toMatch(/^2026-10-13\s+check\s+clean\s+\w{8}\s+400\.0\s/); // the clean street's 400 m gaps [D]
    expect(lines[2]).toMatch(/^2026-10-14\s+check\s+twin-stops\b.*\s1$/);
    const json = JSON.parse((await cli(['history', db, '--json'])).stdout);
    expect(json.map((r: { findings: Record<string, number> }) => r.findings['twin-stops'])).toEqual([0, 1]);
    const out = join(dir, 'history-page');
    const page = await cli(['history', db, '--out', out]);
    expect(page.code).toBe(0);
    const html = readFileSync(join(out, 'history.html'), 'utf8');
    expect(html).toContain('<svg');
    expect(html).toContain('Finding twin-stops (count)');
  });

  it('exits 2 for a history file that does not exist, and does not create it', async () => {
    const missing = join(dir, 'none.sqlite');
    const r = await cli(['history', missing]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^error: .*none\.sqlite.*no such history database/);
    expect(existsSync(missing)).toBe(false);
  });
});

describe('stopspan compare', () => {
  it('reports the added twin stop and the changed pattern, as text, JSON and an HTML page', async () => {
    const out = join(dir, 'compare-page');
    const r = await cli(['compare', join(FIX, 'clean'), join(FIX, 'twin-stops'), '--out', out, '--quiet']);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('stops: 1 added, 0 removed, 0 moved more than 10 m, 0 renamed');
    expect(r.stdout).toMatch(/\+ S2b\s+Vellmoor Marktplein \(b\)/);
    expect(r.stdout).toMatch(/patterns: 0 added, 0 removed, 1 changed, 0 unchanged/);
    expect(r.stdout).toMatch(/inserted S2b/);
    const html = readFileSync(join(out, 'compare.html'), 'utf8');
    expect(html).toContain('Stops added (1)');
    const doc = JSON.parse(readFileSync(join(out, 'compare.json'), 'utf8'));
    expect(doc.stops.added.map((s: { stopId: string }) => s.stopId)).toEqual(['S2b']);
    const j = JSON.parse((await cli(['compare', join(FIX, 'clean'), join(FIX, 'stop-off-path'), '--json', '--move-threshold', '50'])).stdout);
    expect(j.stops.moved.map((s: { stopId: string }) => s.stopId)).toEqual(['S3']);
    expect(j.stops.moved[0].movedM).toBeCloseTo(300, 0);
  });

  it('exits 2 on a bad move threshold or a missing feed', async () => {
    expect((await cli(['compare', join(FIX, 'clean'), join(FIX, 'clean'), '--move-threshold', '-3'])).code).toBe(2);
    expect((await cli(['compare', join(FIX, 'clean'), join(FIX, 'nothing-here')])).code).toBe(2);
  });
});
