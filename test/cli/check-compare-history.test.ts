// The built CLI's check, compare and history commands: stdout, stderr and exit codes, on the fixture
// feeds of fixtures/check and a loopback server for URLs.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT, runCli } from '../helpers/cli.js';
import { checkExitCode } from '../../src/cli/check.js';
import { compareExitCode } from '../../src/cli/compare.js';
import { cpSync } from 'node:fs';
import type { Finding } from '../../src/check/check.js';
import { listenLoopback } from '../helpers/loopback.js';

const FIX = join(ROOT, 'fixtures/check');
const TODAY = '2026-10-14';
let dir: string;

const cli = (args: string[]) => runCli(args);

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'stopspan-cli-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const finding = (severity: Finding['severity']): Finding => ({
  code: 'twin-stops',
  title: '',
  severity,
  explanation: '',
  count: 1,
  examples: [],
});

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

describe('compareExitCode', () => {
  const route = (tripsBefore: number, tripsAfter: number) => ({
    routeId: 'R',
    shortName: '',
    tripsBefore,
    tripsAfter,
    changePct: tripsBefore ? ((tripsAfter - tripsBefore) / tripsBefore) * 100 : null,
  });
  const c = (...byRoute: ReturnType<typeof route>[]) => ({ trips: { byRoute, byPattern: [], listCap: 10 } });
  it('is 1 only when asked and a route lost more than the share asked for (a route gone lost 100 %)', () => {
    expect(compareExitCode(c(route(10, 0)), undefined)).toBe(0);
    expect(compareExitCode(c(route(10, 0)), 99)).toBe(1);
    expect(compareExitCode(c(route(10, 7)), 30)).toBe(0); // exactly 30 % is not more than 30 %
    expect(compareExitCode(c(route(10, 6)), 30)).toBe(1);
    expect(compareExitCode(c(route(10, 20), route(0, 5)), 0)).toBe(0); // gains never fail
  });
});

describe('stopspan check', () => {
  it('exits 0 and says so on the clean feed', async () => {
    const r = await cli(['check', join(FIX, 'clean'), '--today', TODAY]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('no findings');
    expect(r.stdout).toContain('kinds of finding: 0 error, 0 warning, 0 info (0 finding(s) in all)');
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
    expect(doc.service_end).toBe('2026-10-19');
    expect(doc.exit_code).toBe(1);
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
    expect((await cli(['check', join(FIX, 'clean'), '--fail-on', 'sometimes'])).stderr).toMatch(
      /--fail-on: expected one of error, warning, info, never, got sometimes/,
    );
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
    const port = new URL(await listenLoopback(server)).port;
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

  it('checks the run date, or the first day with service after it, and says which and why', async () => {
    const onDay = await cli(['check', join(FIX, 'clean'), '--today', TODAY]);
    expect(onDay.stdout).toContain(`patterns checked on ${TODAY} (the run date ${TODAY}): 1 pattern(s), 2 trips, 5 stops served`);
    // weekday-only service; 2026-09-12 is a Saturday, 2026-09-14 the Monday after [C, ECMAScript Date]
    const sat = await cli(['check', join(FIX, 'clean'), '--today', '2026-09-12']);
    expect(sat.code).toBe(0);
    expect(sat.stdout).toContain(
      'patterns checked on 2026-09-14 (the first day with service after the run date 2026-09-12, on which nothing runs)',
    );
    const j = JSON.parse((await cli(['check', join(FIX, 'clean'), '--today', '2026-09-12', '--json'])).stdout);
    expect(j.analysis_date).toBe('2026-09-14');
    expect(j.analysis).toMatchObject({ date: '2026-09-14', basis: 'next-service-day' });
    expect(j.network.date).toBe('2026-09-14');
    const asked = JSON.parse((await cli(['check', join(FIX, 'clean'), '--today', TODAY, '--date', '2026-10-20', '--json'])).stdout);
    expect(asked.analysis).toMatchObject({ date: '2026-10-20', basis: 'asked' });
  });

  it('fails on a date with no service: --date exits 2 as the audit does, a run date without service is a no-service error', async () => {
    const asked = await cli(['check', join(FIX, 'clean'), '--date', '2030-01-01']);
    expect(asked.code).toBe(2);
    expect(asked.stderr).toBe('error: no trip runs on 2030-01-01\n');
    expect((await cli(['audit', join(FIX, 'clean'), '--date', '2030-01-01', '--out', join(dir, 'never')])).code).toBe(2);
    const late = await cli(['check', join(FIX, 'clean'), '--today', '2030-01-01', '--json']);
    expect(late.code).toBe(1);
    const doc = JSON.parse(late.stdout);
    expect(doc.analysis).toMatchObject({ date: null, basis: 'none' });
    expect(doc.findings.map((f: Finding) => f.code)).toEqual(['service-ended', 'no-service']);
    expect(doc.counts['service-ending-soon']).toBe(0);
    expect(doc.network.patterns).toBe(0);
    // --fail-on never is the only way to let it pass
    expect((await cli(['check', join(FIX, 'clean'), '--today', '2030-01-01', '--fail-on', 'never'])).code).toBe(0);
  });

  it('--json on a failure prints an error document on stdout as well as the line on stderr', async () => {
    const missing = join(FIX, 'no-such-feed.zip');
    for (const args of [
      ['check', missing, '--json'],
      ['compare', missing, missing, '--json'],
      ['check', join(FIX, 'clean'), '--date', '2030-01-01', '--json'],
    ]) {
      const r = await cli(args);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/^error: .+\n$/);
      const doc = JSON.parse(r.stdout);
      expect(doc.exit_code).toBe(2);
      expect(typeof doc.error.code).toBe('string');
      expect(r.stderr).toContain(doc.error.message);
    }
    const r = await cli(['check', missing, '--json']);
    expect(JSON.parse(r.stdout).error).toMatchObject({ code: 'feed-unreadable', file: expect.stringContaining('no-such-feed.zip') });
    const h = await cli(['history', join(dir, 'nothing.sqlite'), '--json']);
    expect(h.code).toBe(2);
    expect(JSON.parse(h.stdout).error.code).toBe('history-db');
  });

  it('--help lists every finding from the table', async () => {
    const r = await cli(['check', '--help']);
    expect(r.code).toBe(0);
    for (const code of [
      'twin-stops',
      'stop-off-path',
      'pathless-trip',
      'distance-backtrack',
      'time-backtrack',
      'implausible-speed',
      'coordinate-fault',
      'service-ending-soon',
      'service-ended',
      'no-service',
      'dangling-reference',
    ]) {
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
    expect(text.stdout).toMatch(
      /since the previous run \(2026-10-13\): new feed content\n  stops served 5 -> 6 \(\+1\)\n  twin-stops \+1 \(now 1\)\n$/,
    ); // the twin stop is a sixth stop [D]
    expect(lines).toHaveLength(3); // header + two runs
    expect(lines[1]).toMatch(/^2026-10-13\s+check\s+clean\s+\w{8}\s+400\.0\s/); // the clean street's 400 m gaps [D]
    expect(lines[2]).toMatch(/^2026-10-14\s+check\s+twin-stops\b.*\s1$/);
    const json = JSON.parse((await cli(['history', db, '--json'])).stdout);
    expect(json.runs.map((r: { findings: Record<string, number> }) => r.findings['twin-stops'])).toEqual([0, 1]);
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
    expect(r.stdout).toMatch(/patterns: 0 added, 0 removed, 1 changed, 0 with changed trips, 0 unchanged/);
    expect(r.stdout).toMatch(/inserted S2b/);
    const html = readFileSync(join(out, 'compare.html'), 'utf8');
    expect(html).toContain('Stops added (1)');
    const doc = JSON.parse(readFileSync(join(out, 'compare.json'), 'utf8'));
    expect(doc.stops.added.map((s: { stop_id: string }) => s.stop_id)).toEqual(['S2b']);
    const j = JSON.parse(
      (await cli(['compare', join(FIX, 'clean'), join(FIX, 'stop-off-path'), '--json', '--move-threshold', '50'])).stdout,
    );
    expect(j.stops.moved.map((s: { stop_id: string }) => s.stop_id)).toEqual(['S3']);
    expect(j.stops.moved[0].moved_m).toBeCloseTo(300, 0);
  });

  it('lists trips a day per route and pattern: an added trip and a cut, and fails on the cut only when asked', async () => {
    const base = join(FIX, 'clean'); // route R1, one pattern, trips T1 (08:00) and T2
    const copy = (name: string, trips: string, extraTimes: string[] = []): string => {
      const d = join(dir, name);
      cpSync(base, d, { recursive: true });
      writeFileSync(join(d, 'trips.txt'), trips);
      const times = readFileSync(join(base, 'stop_times.txt'), 'utf8').trim().split('\n');
      writeFileSync(join(d, 'stop_times.txt'), [...times, ...extraTimes].join('\n') + '\n');
      return d;
    };
    const head = 'route_id,service_id,trip_id,trip_headsign,direction_id,shape_id\n';
    const t1 = readFileSync(join(base, 'stop_times.txt'), 'utf8')
      .trim()
      .split('\n')
      .filter((l) => l.startsWith('T1,'));
    const more = copy(
      'more',
      head + 'R1,WK,T1,Kanaalbrug,0,SH1\nR1,WK,T2,Kanaalbrug,0,SH1\nR1,WK,T9,Kanaalbrug,0,SH1\n',
      t1.map((l) => l.replace(/^T1,/, 'T9,').replace(/08:/g, '23:')),
    );
    const fewer = copy('fewer', head + 'R1,WK,T1,Kanaalbrug,0,SH1\n');
    const added = await cli(['compare', base, more, '--no-audit']);
    expect(added.code).toBe(0);
    expect(added.stdout).toMatch(/patterns: 0 added, 0 removed, 0 changed, 1 with changed trips, 0 unchanged/);
    expect(added.stdout).toMatch(/\+ route R1 \(1\)\s+2 -> 3 \(\+50\.0 %\)/);
    expect(added.stdout).toMatch(/~ R1:0:1\s+2 -> 3 trips, .*-> 8:00:00-23:0\d:00\s+added T9/);
    const cut = await cli(['compare', base, fewer, '--no-audit', '--json', '--fail-on-trip-loss', '40']);
    expect(cut.code).toBe(1);
    const doc = JSON.parse(cut.stdout);
    expect(doc.trips.by_route).toEqual([{ route_id: 'R1', short_name: '1', trips_before: 2, trips_after: 1, change_pct: -50 }]);
    expect(doc.trips.by_pattern[0]).toMatchObject({
      old_pattern_id: 'R1:0:1',
      trips_before: 2,
      trips_after: 1,
      trip_ids_removed: ['T2'],
      trip_ids_removed_count: 1,
      trip_ids_added_count: 0,
    });
    expect(doc.exit_code).toBe(1);
    expect((await cli(['compare', base, fewer, '--no-audit', '--fail-on-trip-loss', '60'])).code).toBe(0);
    expect((await cli(['compare', base, fewer, '--no-audit'])).code).toBe(0);
    const text = await cli(['compare', base, fewer, '--no-audit', '--fail-on-trip-loss', '40']);
    expect(text.stdout).toMatch(/FAIL a route lost more than 40 % of its trips a day\n$/);
    const out = join(dir, 'compare-cut');
    expect((await cli(['compare', base, fewer, '--no-audit', '--out', out, '--quiet'])).code).toBe(0);
    expect(readFileSync(join(out, 'compare.html'), 'utf8')).toContain('Trips per day by route, where they changed (1)');
    const csv = readFileSync(join(out, 'compare-trips.csv'), 'utf8').split('\r\n');
    expect(csv[0]).toBe(
      'level,route_id,old_pattern_id,new_pattern_id,trips_before,trips_after,change_pct,trip_ids_added,trip_ids_removed,first_departure_before,first_departure_after,last_departure_before,last_departure_after',
    );
    expect(csv[1]).toBe('route,R1,,,2,1,-50,,,,,,');
    expect(csv[2]).toMatch(/^pattern,R1,R1:0:1,R1:0:1,2,1,-50,0,1,8:00:00,8:00:00,/);
  });

  it('exits 2 on a bad move threshold or a missing feed', async () => {
    expect((await cli(['compare', join(FIX, 'clean'), join(FIX, 'clean'), '--move-threshold', '-3'])).code).toBe(2);
    expect((await cli(['compare', join(FIX, 'clean'), join(FIX, 'nothing-here')])).code).toBe(2);
  });
});
