// The built CLI's network options on the demo feed of the invented city of Vellmoor: --context (a feed
// that cannot be read is one error line naming it, exit 2; the demo feed as its own context keeps every
// stop as a station) and --exclude-routes / --route-types (an unknown value is one error line, exit 2).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { ROOT, runCli } from '../helpers/cli.js';

const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');
let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'stopspan-network-cli-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const oneErrorLine = (stderr: string) => {
  const lines = stderr.trimEnd().split('\n');
  expect(lines, stderr).toHaveLength(1);
  expect(lines[0]).toMatch(/^error: /);
  return lines[0];
};

describe('stopspan audit --context and the report filters', () => {
  it('stops with one line naming a context feed that cannot be read, writing nothing', async () => {
    const out = join(dir, 'bad-context');
    const r = await runCli(['audit', DEMO, '--context', join(dir, 'no-such-rail.zip'), '--out', out, '--quiet']);
    expect(r.code).toBe(2);
    expect(oneErrorLine(r.stderr)).toMatch(/context feed .*no-such-rail/);
    expect(existsSync(out)).toBe(false);
  });

  it('keeps stops next to a context station, naming it in stops.csv', async () => {
    const out = join(dir, 'self-context');
    const r = await runCli(['audit', DEMO, '--context', DEMO, '--out', out, '--quiet', '--format', 'csv']);
    expect(r.code, r.stderr).toBe(0);
    const stops = parse(readFileSync(join(out, 'stops.csv')), { columns: true }) as Record<string, string>[];
    // each stop stands 0 m from itself as a context station: every stop not fixed for another reason is kept as a station
    const station = stops.filter((s) => s.fixed_reason === 'station');
    expect(station.length).toBeGreaterThan(0);
    expect(station.every((s) => /^station .+ \(demo-feed\), \d+ m$/.test(s.fixed_note))).toBe(true);
    expect(stops.every((s) => s.verdict === 'fixed' || s.fixed_reason === '')).toBe(true);
  });

  it('refuses an unknown route or route type in one line', async () => {
    const a = await runCli(['audit', DEMO, '--exclude-routes', 'NO-SUCH-ROUTE', '--out', join(dir, 'x1'), '--quiet']);
    expect(a.code).toBe(2);
    expect(oneErrorLine(a.stderr)).toMatch(/--exclude-routes.*NO-SUCH-ROUTE/);
    const b = await runCli(['audit', DEMO, '--route-types', 'zeppelin', '--out', join(dir, 'x2'), '--quiet']);
    expect(b.code).toBe(2);
    expect(oneErrorLine(b.stderr)).toMatch(/--route-types/);
  });
});
