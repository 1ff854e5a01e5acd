// The built CLI's audit command: what it writes, what it prints, and its exit codes (DESIGN.md section 6:
// 0 ran clean, 2 bad input or usage) on the demo feed of the invented city of Vellmoor.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import Database from 'better-sqlite3';
import { ROOT, runCli } from '../helpers/cli.js';
import { REPORT_MARKER } from '../../src/report/writeFolder.js';

const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');
const RIDERSHIP = join(ROOT, 'fixtures/demo/ridership.csv');
let dir: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'stopspan-audit-cli-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const oneErrorLine = (stderr: string) => {
  const lines = stderr.trimEnd().split('\n');
  expect(lines, stderr).toHaveLength(1);
  expect(lines[0]).toMatch(/^error: /);
  expect(stderr).not.toMatch(/\n\s+at /);
  return lines[0];
};

describe('stopspan audit', () => {
  it('writes every output of the contract and prints the headline on stdout', async () => {
    const out = join(dir, 'full');
    const r = await runCli(['audit', DEMO, '--ridership', RIDERSHIP, '--out', out, '--quiet']);
    expect(r.code, r.stderr).toBe(0);
    expect(readdirSync(out).sort()).toEqual([
      REPORT_MARKER,
      'candidates.csv',
      'candidates.geojson',
      'index.html',
      'patterns.csv',
      'patterns.geojson',
      'plan.json',
      'stop_points.geojson',
      'stops.csv',
      'stops.geojson',
      'summary.json',
    ]);
    expect(r.stdout).toMatch(/patterns, \d+ stops, median gap \d+ m/);
    expect(r.stderr).toBe(''); // not a TTY: no progress drawn
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.demand_source).toBe('observed');
    // csv-parse as an outside reader: one stops.csv row per stop of each pattern in patterns.csv
    const patterns = parse(readFileSync(join(out, 'patterns.csv')), { columns: true }) as Record<string, string>[];
    const stops = parse(readFileSync(join(out, 'stops.csv')), { columns: true }) as Record<string, string>[];
    const total = patterns.reduce((s, p) => s + Number(p.stop_count), 0);
    expect(stops.length).toBe(total);
    // the plan: plan.json read back by whatif gives the joint figures summary.json states for it
    const back = await runCli(['whatif', DEMO, '--ridership', RIDERSHIP, '--scenario', join(out, 'plan.json'), '--json', '-q']);
    expect(back.code, back.stderr).toBe(0);
    const w = JSON.parse(back.stdout);
    expect(w.totals.net_pax_min_per_day).toBeCloseTo(summary.plan.totals.net_pax_min_per_day, 6);
    expect(w.totals.run_time_saved_per_trip_s).toBeCloseTo(summary.plan.totals.run_time_saved_per_trip_s, 6);
    expect(w.fleet).toEqual(summary.plan.fleet);
    // stops.csv marks each stop the plan drops: optimiser_keeps=no exactly on its (stop, pattern) pairs
    const drops = stops
      .filter((s) => s.optimiser_keeps === 'no')
      .map((s) => `${s.stop_id}|${s.pattern_id}`)
      .sort();
    const planned = (JSON.parse(readFileSync(join(out, 'plan.json'), 'utf8')).remove as { stop: string; patterns: string[] }[])
      .flatMap((x) => x.patterns.map((p) => `${x.stop}|${p}`))
      .sort();
    expect(drops).toEqual(planned);
  });

  it('refuses to replace an existing folder without --force, or with a file of someone else in it, and leaves it untouched', async () => {
    const out = join(dir, 'exists');
    const first = await runCli(['audit', DEMO, '--out', out, '--format', 'json', '-q']);
    expect(first.code, first.stderr).toBe(0);
    writeFileSync(join(out, 'mine.txt'), 'keep me');
    const second = await runCli(['audit', DEMO, '--out', out, '-q']);
    expect(second.code).toBe(2);
    expect(oneErrorLine(second.stderr)).toMatch(/--force|exists/);
    expect(readFileSync(join(out, 'mine.txt'), 'utf8')).toBe('keep me');
    const refused = await runCli(['audit', DEMO, '--out', out, '--format', 'csv', '--force', '-q']);
    expect(refused.code).toBe(2);
    expect(oneErrorLine(refused.stderr)).toMatch(/it holds mine\.txt, which stopspan did not write there/);
    expect(readFileSync(join(out, 'mine.txt'), 'utf8')).toBe('keep me');
    rmSync(join(out, 'mine.txt'));
    const forced = await runCli(['audit', DEMO, '--out', out, '--format', 'csv', '--force', '-q']);
    expect(forced.code, forced.stderr).toBe(0);
    expect(readdirSync(out).sort()).toEqual([REPORT_MARKER, 'candidates.csv', 'patterns.csv', 'stops.csv']);
  });

  it('rejects bad options with one line naming the option and exit 2, writing nothing', async () => {
    const cases: [string[], RegExp][] = [
      [['--units', 'cubits'], /--units/],
      [['--format', 'pdf'], /--format/],
      [['--date', '14/10/2026'], /date/],
      [['--walk-weight', '-1'], /walk_weight/],
      [['--stopping-model', 'sometimes'], /stopping_model/],
    ];
    for (const [args, re] of cases) {
      const out = join(dir, 'bad-' + args[0].slice(2));
      const r = await runCli(['audit', DEMO, '--out', out, '-q', ...args]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(oneErrorLine(r.stderr)).toMatch(re);
      expect(existsSync(out)).toBe(false);
    }
  });

  it('rejects a parameters file with an unknown key, naming the key and the file', async () => {
    const file = join(dir, 'params.json');
    writeFileSync(file, JSON.stringify({ walk_speed_mps: 1.3, walking_pace: 2 }));
    const r = await runCli(['audit', DEMO, '--params', file, '--out', join(dir, 'p'), '-q']);
    expect(r.code).toBe(2);
    const line = oneErrorLine(r.stderr);
    expect(line).toContain('walking_pace');
    expect(line).toContain('params.json');
  });

  it('takes parameters from a file and from single options, the option winning, and reports them as user-set', async () => {
    const file = join(dir, 'params-ok.json');
    writeFileSync(file, JSON.stringify({ walk_speed_mps: 1.3, walk_weight: 1.8 }));
    const out = join(dir, 'params-ok');
    const r = await runCli(['audit', DEMO, '--params', file, '--walk-weight', '2.2', '--out', out, '--format', 'json', '-q']);
    expect(r.code, r.stderr).toBe(0);
    const p = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')).parameters;
    expect(p.walk_speed_mps).toMatchObject({ value: 1.3, source: 'user' });
    expect(p.walk_weight).toMatchObject({ value: 2.2, source: 'user' });
    expect(p.door_time_s.source).not.toBe('user');
  });

  it('appends one history row per successful run and none for a failed one', async () => {
    const db = join(dir, 'history.sqlite');
    const ok = await runCli(['audit', DEMO, '--out', join(dir, 'h1'), '--format', 'json', '--history', db, '-q']);
    expect(ok.code, ok.stderr).toBe(0);
    const bad = await runCli(['audit', join(dir, 'no-such-feed.zip'), '--out', join(dir, 'h2'), '--history', db, '-q']);
    expect(bad.code).toBe(2);
    const rows = new Database(db, { readonly: true }).prepare('select count(*) as n from runs').get() as { n: number };
    expect(rows.n).toBe(1);
  });

  it('prints usage errors for a missing feed argument with exit 2', async () => {
    const r = await runCli(['audit']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/missing required argument/);
  });
});

describe('stopspan compare with a ridership file', () => {
  it('audits both versions on the same counted ridership, which changes the spacing figures', async () => {
    const NEXT = join(ROOT, 'fixtures/demo/demo-feed-next.zip');
    const assumed = await runCli(['compare', DEMO, NEXT, '--json', '-q']);
    const counted = await runCli(['compare', DEMO, NEXT, '--ridership', RIDERSHIP, '--json', '-q']);
    expect(assumed.code, assumed.stderr).toBe(0);
    expect(counted.code, counted.stderr).toBe(0);
    const a = JSON.parse(assumed.stdout).spacing.before;
    const c = JSON.parse(counted.stdout).spacing.before;
    expect(c.median_gap_m).toBeCloseTo(a.median_gap_m, 6); // geometry does not depend on demand
    expect(c.pax_min_lost_per_day).not.toBeCloseTo(a.pax_min_lost_per_day, 0);
  });
});
