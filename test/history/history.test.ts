// The run history: schema on first use, transactional writes, reading back, rendering, and two processes
// writing at once without corrupting the database.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cpSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { spawn, spawnSync } from 'node:child_process';
import Database from 'better-sqlite3';
import { openHistory, recordRun, readHistory, historyHtml, historyText, checkRunRow, SCHEMA_VERSION, type RunRow } from '../../src/history/index.js';
import { checkFeed } from '../../src/audit/check.js';
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
    expect((db.prepare('SELECT version FROM schema_version').all() as { version: number }[])).toEqual([{ version: SCHEMA_VERSION }]);
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

  it('writes nothing when a run fails part-way (one transaction)', () => {
    const db = openHistory(join(dir, 'atomic.sqlite'));
    recordRun(db, row(1));
    db.exec(`CREATE TRIGGER boom BEFORE INSERT ON run_findings WHEN NEW.code = 'boom' BEGIN SELECT RAISE(ABORT, 'boom'); END`);
    expect(() => recordRun(db, row(2, { findings: { 'twin-stops': 1, boom: 1 } }))).toThrow(expect.objectContaining({ code: 'history-db' }));
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
    expect(Object.keys(r.findings)).toHaveLength(9);
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
    expect(html.match(/<svg /g)!.length).toBe(8); // 4 headline + 2 severity + 2 finding codes
    expect(html).toContain('<polyline');
    expect(historyText(rows).split('\n')[1]).toMatch(/^2026-10-10\s+check\s+v0\s+hash0\s+300\.0\s+10\s+2\s+0\s+0\s+0\s+0$/);
    expect(historyText([])).toMatch(/no runs/);
    expect(historyText(rows)).toMatch(/since the previous run \(2026-10-10\): new feed content\n  twin-stops \+1 \(now 1\)\n$/);
    expect(historyText([rows[0], { ...rows[0], id: 9 }])).toMatch(/same feed content\n  no finding changed its count\n$/);
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
    expect(r.stderr).toBe(`error: ${db}: the run history needs the optional package better-sqlite3 (version 12), which is not installed here: run npm install better-sqlite3@12\n`);
    const v = spawnSync(process.execPath, [bin, '--version'], { cwd: copy, encoding: 'utf8' });
    expect(v.status).toBe(0);
    expect(v.stdout).toMatch(/^\d+\.\d+\.\d+/);
  });
});
