// The run history: schema on first use, transactional writes, reading back, rendering, and two processes
// writing at once without corrupting the database.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { spawn, spawnSync } from 'node:child_process';
import Database from 'better-sqlite3';
import {
  openHistory,
  recordRun,
  readHistory,
  checkRunRow,
  auditRunRow,
  SCHEMA_VERSION,
  type RunRecord,
  type RunRow,
} from '../../src/history/index.js';
import { historyHtml, lineChartSvg, seriesOf, varies, yRange } from '../../src/report/historyHtml.js';
import { historyText } from '../../src/report/historyText.js';
import { HISTORY_APPLICATION_ID } from '../../src/history/openHistory.js';
import { makeSampleResult } from '../report/sampleResult.js';
import { checkFeed } from '../../src/check/check.js';
import { buildFeed, cleanSpec } from '../helpers/buildFeed.js';
import { ROOT } from '../helpers/cli.js'; // builds dist/ when it is older than the sources

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'stopspan-history-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const row = (k: number, extra: Partial<RunRow> = {}): RunRow => ({
  runDate: `2026-10-${String(10 + k).padStart(2, '0')}`,
  command: 'check',
  feed: { source: 'https://vellmoor.example/gtfs.zip', contentHash: `hash${k}`, version: `v${k}`, publisher: 'Vellmoor Transit' },
  headline: { medianGapM: 300 + k, closeStops: 10 - k, wideGaps: 2, paxMinLostPerDay: 1000.5 * k },
  findings: { 'twin-stops': k, 'coordinate-fault': 0 },
  severities: { error: 0, warning: k > 0 ? 1 : 0, info: 0 },
  ...extra,
});

describe('openHistory', () => {
  it('creates a versioned schema in WAL mode on first use, and reopens it unchanged', () => {
    const path = join(dir, 'first.sqlite');
    const db = openHistory(path);
    expect(db.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(Number(db.pragma('busy_timeout', { simple: true }))).toBe(10_000);
    expect(db.prepare('SELECT version FROM schema_version').all() as { version: number }[]).toEqual([{ version: SCHEMA_VERSION }]);
    db.close();
    const again = openHistory(path);
    expect(again.prepare('SELECT COUNT(*) AS n FROM schema_version').get()).toEqual({ n: 1 });
    again.close();
  });

  it('refuses a database from a newer stopspan', () => {
    const path = join(dir, 'newer.sqlite');
    openHistory(path).close();
    const raw = new Database(path);
    raw.prepare('UPDATE schema_version SET version = 99').run();
    raw.close();
    expect(() => openHistory(path)).toThrow(/schema version 99/);
  });

  it("refuses another program's database, for writing or reading, before changing anything in it", () => {
    const path = join(dir, 'depots.sqlite');
    const other = new Database(path);
    other.exec("CREATE TABLE depots (name TEXT); INSERT INTO depots VALUES ('Vellmoor North')");
    other.close();
    const bytes = readFileSync(path);
    for (const readOnly of [false, true]) {
      expect(() => openHistory(path, { readOnly })).toThrow(
        expect.objectContaining({
          code: 'history-db',
          message: expect.stringMatching(/not a stopspan history database: it is another program's \(it holds depots\)/),
        }),
      );
    }
    expect(readFileSync(path).equals(bytes)).toBe(true);
    expect(existsSync(path + '-wal')).toBe(false);
    const marked = new Database(join(dir, 'marked.sqlite'));
    marked.pragma('application_id = 1234');
    marked.close();
    expect(() => openHistory(join(dir, 'marked.sqlite'))).toThrow(/another program's \(application id 1234\)/);
  });

  it('marks what it creates, takes an unmarked history it wrote before, and opens one read-only to read', () => {
    const path = join(dir, 'marker.sqlite');
    openHistory(path).close();
    const raw = new Database(path);
    expect(raw.pragma('application_id', { simple: true })).toBe(HISTORY_APPLICATION_ID);
    raw.pragma('application_id = 0'); // as histories written before the marker are
    raw.close();
    const ro = openHistory(path, { readOnly: true });
    expect(ro.readonly).toBe(true);
    expect(readHistory(ro)).toEqual([]);
    ro.close();
    openHistory(path).close(); // opening to write marks it
    const again = new Database(path, { readonly: true });
    expect(again.pragma('application_id', { simple: true })).toBe(HISTORY_APPLICATION_ID);
    again.close();
    expect(() => openHistory(join(dir, 'absent.sqlite'), { readOnly: true })).toThrow(expect.objectContaining({ code: 'history-db' }));
    expect(existsSync(join(dir, 'absent.sqlite'))).toBe(false);
  });

  it('names the file when it cannot be opened', () => {
    expect(() => openHistory(join(dir, 'no-such-dir', 'x.sqlite'))).toThrow(expect.objectContaining({ code: 'history-db' }));
  });
});

describe('recordRun and readHistory', () => {
  it('round-trips rows, oldest first, with their findings', () => {
    const db = openHistory(join(dir, 'rt.sqlite'));
    const ids = [2, 0, 1].map((k) => recordRun(db, row(k)));
    expect(new Set(ids).size).toBe(3);
    const rows = readHistory(db);
    expect(rows.map((r) => r.runDate)).toEqual(['2026-10-10', '2026-10-11', '2026-10-12']);
    expect(rows[2]).toMatchObject({
      command: 'check',
      feed: { contentHash: 'hash2', version: 'v2', publisher: 'Vellmoor Transit' },
      headline: { medianGapM: 302, closeStops: 8, wideGaps: 2, paxMinLostPerDay: 2001, patterns: null },
      severities: { error: 0, warning: 1, info: 0 },
      findings: { 'twin-stops': 2, 'coordinate-fault': 0 },
    });
    expect(readHistory(db, { limit: 2 }).map((r) => r.runDate)).toEqual(['2026-10-11', '2026-10-12']);
    expect(readHistory(db, { command: 'audit' })).toEqual([]);
    db.close();
  });

  it("keeps one feed's runs with feed: its publisher, or its source when it names none", () => {
    const db = openHistory(join(dir, 'feeds.sqlite'));
    recordRun(db, row(0));
    recordRun(db, row(1, { feed: { source: 'kanaal.zip', contentHash: 'k', version: 'v', publisher: '' } }));
    recordRun(db, row(2));
    expect(readHistory(db, { feed: 'Vellmoor Transit' }).map((r) => r.runDate)).toEqual(['2026-10-10', '2026-10-12']);
    expect(readHistory(db, { feed: 'kanaal.zip' }).map((r) => r.runDate)).toEqual(['2026-10-11']);
    expect(readHistory(db, { feed: 'https://vellmoor.example/gtfs.zip' })).toEqual([]); // it names a publisher
    db.close();
  });

  it('writes nothing when a run fails part-way (one transaction)', () => {
    const db = openHistory(join(dir, 'atomic.sqlite'));
    recordRun(db, row(1));
    db.exec(`CREATE TRIGGER boom BEFORE INSERT ON run_findings WHEN NEW.code = 'boom' BEGIN SELECT RAISE(ABORT, 'boom'); END`);
    expect(() => recordRun(db, row(2, { findings: { 'twin-stops': 1, boom: 1 } }))).toThrow(
      expect.objectContaining({ code: 'history-db' }),
    );
    expect(db.prepare('SELECT COUNT(*) AS n FROM runs').get()).toEqual({ n: 1 });
    expect(db.prepare('SELECT COUNT(*) AS n FROM run_findings').get()).toEqual({ n: 2 });
    db.close();
  });

  it('rejects a malformed row before writing', () => {
    const db = openHistory(join(dir, 'bad.sqlite'));
    expect(() => recordRun(db, row(1, { runDate: '14.10.2026' }))).toThrow(/runDate/);
    expect(() => recordRun(db, row(1, { findings: { 'twin-stops': -1 } }))).toThrow(/twin-stops/);
    expect(() => recordRun(db, row(1, { headline: { medianGapM: NaN } }))).toThrow(/medianGapM/);
    expect(readHistory(db)).toEqual([]);
    db.close();
  });

  it('records a check report with every finding code', () => {
    const db = openHistory(join(dir, 'check.sqlite'));
    const { feed, patterns } = buildFeed(cleanSpec());
    recordRun(db, checkRunRow(checkFeed(feed, patterns, { today: '2026-10-14' })));
    const [r] = readHistory(db);
    expect(r.runDate).toBe('2026-10-14');
    expect(Object.keys(r.findings)).toHaveLength(11);
    // the clean Vellmoor street: one pattern, five stops, 400 m gaps [D]
    expect(r.headline).toMatchObject({ patterns: 1, stops: 5, trips: 1, analysisDate: '2026-10-14' });
    expect(r.headline.medianGapM).toBeCloseTo(400, 1);
    db.close();
  });
});

describe('rendering', () => {
  it('draws one SVG chart per figure and escapes feed text', () => {
    const rows = [row(0), row(1)].map((r, i) => ({
      id: i + 1,
      recordedAt: '',
      runDate: r.runDate,
      command: r.command,
      feed: { ...r.feed, publisher: r.feed.publisher!, version: i ? '<script>alert(1)</script>' : 'v0' },
      headline: { analysisDate: null, patterns: null, stops: null, trips: null, meanOptimalSpacingM: null, ...r.headline } as any,
      severities: { error: 0, warning: 0, info: 0, ...r.severities },
      findings: r.findings!,
    }));
    const html = historyHtml(rows);
    expect(html).not.toContain('<script>');
    expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(html).not.toMatch(/src=|href=|@import|url\(/); // self-contained
    // the figures that change between the two runs: median gap, close stops, pax-min, warnings, twin-stops;
    // wide gaps (2, 2), errors (0, 0) and coordinate-fault (0, 0) are flat and said in a sentence instead
    expect(html.match(/<svg /g)!.length).toBe(5);
    expect(html).not.toContain('aria-label="Wide gaps"');
    expect(html).toMatch(
      /The same in every run: Wide gaps 2; Kinds of finding at error severity 0; Finding coordinate-fault \(count\) 0\./,
    );
    expect(html).toContain('<polyline');
    expect(historyText(rows).split('\n')[1]).toMatch(/^2026-10-10\s+check\s+v0\s+hash0\s+300\.0\s+10\s+2\s+0\s+0\s+0\s+0$/);
    expect(historyText([])).toMatch(/no runs/);
    expect(historyText(rows)).toMatch(
      /since the previous run \(2026-10-10\): new feed content\n  median gap m 300\.0 -> 301\.0 \(\+1\.0\)\n  close stops 10 -> 9 \(-1\)\n  pax-min lost per day 0 -> 1001 \(\+1001\)\n  twin-stops \+1 \(now 1\)\n$/,
    );
    expect(historyText([rows[0], { ...rows[0], id: 9 }])).toMatch(/same feed content\n  no figure and no finding changed\n$/);
  });
});

const record = (runDate: string, extra: Partial<RunRecord> = {}): RunRecord => ({
  id: 0,
  recordedAt: '2026-12-03T20:00:00.000Z',
  runDate,
  command: 'check',
  feed: { source: 'vellmoor.zip', contentHash: 'h', version: 'v', publisher: 'Vellmoor Transit' },
  headline: {
    analysisDate: runDate,
    patterns: 40,
    stops: 1186,
    trips: 900,
    medianGapM: 300,
    meanOptimalSpacingM: null,
    closeStops: null,
    wideGaps: null,
    paxMinLostPerDay: null,
  },
  severities: { error: 0, warning: 0, info: 0 },
  findings: { 'twin-stops': 0 },
  ...extra,
});
const cx = (svg: string): number[] => [...svg.matchAll(/<circle cx="([\d.]+)" cy="([\d.]+)"/g)].map((m) => Number(m[1]));
const cy = (svg: string): number[] => [...svg.matchAll(/<circle cx="([\d.]+)" cy="([\d.]+)"/g)].map((m) => Number(m[2]));

describe('the history page shows change', () => {
  it('places runs by date: a run ten days after the second sits ten times as far along as the second from the first', () => {
    const svg = lineChartSvg(
      { title: 'Stops served', values: [1186, 1187, 1189] },
      ['2026-10-01', '2026-10-02', '2026-10-12'],
      ['A', 'A', 'A'],
    );
    const [a, b, c] = cx(svg);
    expect((c - a) / (b - a)).toBeCloseTo(11, 6); // 11 days against 1 day [D]
  });

  it('spans the y axis over the values, so 1 186 -> 1 189 is visible; from zero only when zero is near', () => {
    expect(yRange([1186, 1189]).lo).toBeGreaterThan(1180);
    expect(yRange([2, 5]).lo).toBe(0); // zero is nearer than the span (3)
    expect(yRange([0, 3])).toMatchObject({ lo: 0 });
    const [y1, y2] = cy(lineChartSvg({ title: 'Stops served', values: [1186, 1189] }, ['2026-10-01', '2026-10-02'], ['A', 'A']));
    expect(y1 - y2).toBeGreaterThan(80); // most of the 118 px plot height, not 0.3 % of it
  });

  it('draws one line per feed and never joins runs of different feeds', () => {
    const rows = [
      record('2026-10-01'),
      record('2026-10-02', {
        feed: { source: 'other.zip', contentHash: 'o', version: 'v', publisher: 'Kanaalbus' },
        headline: { ...record('x').headline, stops: 300 },
      }),
      record('2026-10-03', { headline: { ...record('x').headline, stops: 1189 } }),
      record('2026-10-04', {
        feed: { source: 'other.zip', contentHash: 'o', version: 'v', publisher: 'Kanaalbus' },
        headline: { ...record('x').headline, stops: 310 },
      }),
    ];
    const stops = seriesOf(rows).find((s) => s.title === 'Stops served')!;
    const svg = lineChartSvg(
      stops,
      rows.map((r) => r.runDate),
      rows.map((r) => r.feed.publisher),
    );
    const lines = [...svg.matchAll(/<polyline points="([^"]+)"/g)].map((m) => m[1].split(' ').length);
    expect(lines).toEqual([2, 2]);
    expect(historyHtml(rows)).toContain('2 feeds');
    // the diff is against the previous run of the same feed
    expect(historyText(rows)).toMatch(/since the previous run \(2026-10-02\): same feed content\n  stops served 300 -> 310 \(\+10\)\n/);
  });

  it('does not plot audit runs as zero errors: they ran no checks', () => {
    const rows = [
      record('2026-10-01', { severities: { error: 1, warning: 0, info: 0 }, findings: { 'service-ended': 1 } }),
      record('2026-10-02', { command: 'audit', findings: {} }),
    ];
    const errors = seriesOf(rows).find((s) => s.title === 'Kinds of finding at error severity')!;
    expect(errors.values).toEqual([1, null]);
    expect(varies(errors)).toBe(false);
    expect(historyText(rows).split('\n')[2]).toMatch(/\s-\s+-\s+-$/);
  });

  it("records an audit's run date as the date it analysed, not the clock", () => {
    const result = makeSampleResult();
    expect(auditRunRow(result).runDate).toBe(result.date);
    expect(result.generatedAt.slice(0, 10)).not.toBe(result.date); // the sample's clock and date differ, so the check can fail
  });
});

describe('two processes writing at once', () => {
  it('keeps every row and passes integrity_check', async () => {
    // the children load the built library (dist/), which resolves better-sqlite3 from the project's node_modules
    const library = pathToFileURL(join(ROOT, 'dist/history/index.js')).href;
    const script = join(dir, 'writer.mjs');
    writeFileSync(
      script,
      `import { existsSync, writeFileSync } from 'node:fs';
import { openHistory, recordRun } from '${library}';
const [path, who, other, n] = process.argv.slice(2);
const db = openHistory(path);
// start together: say ready, then wait for the other writer (a barrier, not a timing)
writeFileSync(path + '.ready-' + who, '');
const until = Date.now() + 30000; // a writer whose partner failed gives up instead of waiting for ever
while (!existsSync(path + '.ready-' + other)) {
  if (Date.now() > until) throw new Error('the other writer never got ready');
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 5);
}
for (let k = 0; k < Number(n); k++) {
  recordRun(db, { runDate: '2026-10-14', command: 'check', feed: { source: who, contentHash: who + k, version: 'v' },
    findings: { 'twin-stops': k, 'stop-off-path': 1 }, severities: { warning: 2 } });
}
db.close();
`,
    );
    const path = join(dir, 'shared.sqlite'); // not created yet: both children race to create the schema too
    const N = 1000;
    const child = (who: string, other: string) =>
      new Promise<number>((ok, fail) => {
        const p = spawn(process.execPath, [script, path, who, other, String(N)], { cwd: ROOT, stdio: ['ignore', 'ignore', 'pipe'] });
        let err = '';
        p.stderr.on('data', (d) => (err += d));
        p.on('error', fail);
        p.on('exit', (code) => (code === 0 ? ok(code) : fail(new Error(`writer ${who} exited ${code}: ${err}`))));
      });
    await Promise.all([child('A', 'B'), child('B', 'A')]);
    const db = new Database(path, { readonly: true });
    expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
    expect(db.prepare('SELECT feed_source, COUNT(*) AS n FROM runs GROUP BY feed_source ORDER BY 1').all()).toEqual([
      { feed_source: 'A', n: N },
      { feed_source: 'B', n: N },
    ]);
    expect(db.prepare('SELECT COUNT(*) AS n FROM run_findings').get()).toEqual({ n: 4 * N });
    db.close();
  }, 60_000);
});

describe('without the optional SQLite binding', () => {
  it('says in one line how to install it, exit 2, and every other command still loads', () => {
    // a copy of the built command where better-sqlite3 cannot be resolved (no node_modules above it)
    const copy = join(dir, 'no-sqlite');
    cpSync(join(ROOT, 'dist'), join(copy, 'dist'), { recursive: true });
    writeFileSync(join(copy, 'package.json'), '{"type":"module"}');
    const db = join(copy, 'runs.sqlite');
    writeFileSync(db, '');
    const bin = join(copy, 'dist/bin/stopspan.js');
    const r = spawnSync(process.execPath, [bin, 'history', db], { cwd: copy, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } });
    expect(r.status).toBe(2);
    expect(r.stderr).toBe(
      `error: ${db}: the run history needs the optional package better-sqlite3 (version 12), which is not installed here: run npm install better-sqlite3@12\n`,
    );
    const v = spawnSync(process.execPath, [bin, '--version'], { cwd: copy, encoding: 'utf8' });
    expect(v.status).toBe(0);
    expect(v.stdout).toMatch(/^\d+\.\d+\.\d+/);
  });
});
