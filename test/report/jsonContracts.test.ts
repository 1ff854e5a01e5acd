// Every JSON document the commands print or write, from real runs of the built command, validated by ajv
// (an outside JSON Schema validator, draft 2020-12) against its schema in schema/: audit --json
// (summary.json), check --json, compare --json and compare.json, history --json, and the error document.
// Each key is snake_case; the schemas are importable from the package; --out - is refused.

import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020.js';
import { parse } from 'csv-parse/sync';
import { afterAll, describe, expect, it } from 'vitest';
import { ROOT, runCli } from '../helpers/cli.js';
import { snakeKeys, snakeKey as snakeName } from '../../src/common/snakeKeys.js';

// RFC 3339 section 5.6 date-time [C], the meaning JSON Schema gives "format": "date-time"
const RFC3339 = /^\d{4}-\d{2}-\d{2}[Tt ]\d{2}:\d{2}:\d{2}(\.\d+)?([Zz]|[+-]\d{2}:\d{2})$/;
const ajv = new Ajv2020.default({
  allErrors: true,
  strict: true,
  allowUnionTypes: true,
  formats: { 'date-time': (s: string) => RFC3339.test(s) && !Number.isNaN(Date.parse(s)) },
});
const validator = (name: string) => ajv.compile(JSON.parse(readFileSync(join(ROOT, 'schema', `${name}.schema.json`), 'utf8')));
const SCHEMAS = {
  summary: validator('summary'),
  check: validator('check'),
  compare: validator('compare'),
  history: validator('history'),
  error: validator('error'),
};

const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');
const NEXT = join(ROOT, 'fixtures/demo/demo-feed-next.zip');
const FIX = join(ROOT, 'fixtures/check');
const dir = mkdtempSync(join(tmpdir(), 'stopspan-contracts-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The keys of a document, the children of data maps (finding codes, GTFS field names) left out. */
function keysDeep(v: unknown, out: string[] = []): string[] {
  if (Array.isArray(v)) v.forEach((x) => keysDeep(x, out));
  else if (v && typeof v === 'object')
    for (const [k, x] of Object.entries(v)) {
      out.push(k);
      if (!['counts', 'findings', 'ids', 'parameters'].includes(k) || Array.isArray(x)) keysDeep(x, out);
    }
  return out;
}

function expectValid(name: keyof typeof SCHEMAS, doc: unknown): void {
  const validate = SCHEMAS[name];
  validate(doc);
  expect(validate.errors ?? [], name).toEqual([]);
  const camel = keysDeep(doc).filter((k) => /[A-Z]/.test(k));
  expect(camel, `${name}: keys in snake_case`).toEqual([]);
  expect((doc as { schema_version: number }).schema_version).toBe(1);
}

describe('snakeName', () => {
  it('turns camelCase names into snake_case and leaves data keys alone', () => {
    expect(snakeName('contentHash')).toBe('content_hash');
    expect(snakeName('medianGapM')).toBe('median_gap_m');
    expect(snakeName('paxMinLostPerDay')).toBe('pax_min_lost_per_day');
    expect(snakeName('tripIdsAddedCount')).toBe('trip_ids_added_count');
    expect(snakeName('twin-stops')).toBe('twin-stops');
    expect(snakeName('stop_id')).toBe('stop_id');
    expect(snakeKeys({ aB: [{ cD: 1 }], e: null })).toEqual({ a_b: [{ c_d: 1 }], e: null });
  });
});

describe('JSON documents against their schemas', () => {
  it('audit --json prints summary.json on stdout, the same document the folder holds', async () => {
    const out = join(dir, 'audit');
    const r = await runCli(['audit', DEMO, '--json', '--out', out, '--format', 'json']);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expectValid('summary', doc);
    expect(doc).toEqual(JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')));
  });

  it('audit --json=full adds every row of the three CSV files, as csv-parse reads them, and nothing else changes', async () => {
    const out = join(dir, 'audit-full');
    const r = await runCli(['audit', DEMO, '--json=full', '--out', out, '--format', 'csv,json']);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout) as Record<string, Record<string, unknown>[]>;
    expectValid('summary', doc);
    const { patterns, stops, candidates, ...summary } = doc;
    expect(summary).toEqual(JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')));
    // each CSV read by csv-parse (an outside RFC 4180 reader): same columns in the same order, same values
    for (const [file, rows] of [
      ['patterns.csv', patterns],
      ['stops.csv', stops],
      ['candidates.csv', candidates],
    ] as const) {
      const table = parse(readFileSync(join(out, file), 'utf8'), { columns: true }) as Record<string, string>[];
      expect(rows.length, file).toBe(table.length);
      expect(rows.length, file).toBeGreaterThan(0);
      table.forEach((row, i) => {
        expect(Object.keys(rows[i]), file).toEqual(Object.keys(row));
        for (const [k, cell] of Object.entries(row)) {
          const v = rows[i][k];
          if (typeof v === 'number') expect(Number(cell), `${file} ${k}`).toBe(v);
          else if (v === null) expect(cell, `${file} ${k}`).toBe('');
          else expect(cell.replace(/^'(?=[=+\-@\t\r])/, ''), `${file} ${k}`).toBe(v); // a guarded text cell
        }
      });
    }
  });

  it('audit --json with another detail than full is refused with one line', async () => {
    const r = await runCli(['audit', DEMO, '--json=rows', '--out', join(dir, 'never')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toEqual(['error: invalid option --json: expected nothing or =full, got rows']);
    expect(existsSync(join(dir, 'never'))).toBe(false);
  });

  it('audit --out - is refused with one line and creates nothing', async () => {
    const r = await runCli(['audit', DEMO, '--out', '-'], { cwd: dir });
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^error: invalid option --out: "-" is not a folder; .*--json/);
    expect(existsSync(join(dir, '-'))).toBe(false);
    const j = await runCli(['audit', DEMO, '--out', '-', '--json'], { cwd: dir });
    expect(j.code).toBe(2);
    expectValid('error', JSON.parse(j.stdout));
  });

  it('check --json, with findings and with a history recorded, and history --json', async () => {
    const db = join(dir, 'h.sqlite');
    for (const [feed, today] of [
      [join(FIX, 'clean'), '2026-10-14'],
      [join(FIX, 'twin-stops'), '2026-10-14'],
      [DEMO, '2026-10-14'],
      [DEMO, '2026-11-02'],
    ]) {
      const r = await runCli(['check', feed, '--json', '--today', today, '--history', db]);
      expect([0, 1]).toContain(r.code);
      expectValid('check', JSON.parse(r.stdout));
    }
    const h = await runCli(['history', db, '--json']);
    expect(h.code).toBe(0);
    const doc = JSON.parse(h.stdout);
    expectValid('history', doc);
    expect(doc.runs).toHaveLength(4);
  });

  it('compare --json with and without the audits, and compare.json', async () => {
    const out = join(dir, 'cmp');
    const r = await runCli(['compare', DEMO, NEXT, '--json', '-q', '--out', out]);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expectValid('compare', doc);
    expect(doc.candidates).not.toBeNull();
    expectValid('compare', JSON.parse(readFileSync(join(out, 'compare.json'), 'utf8')));
    const lean = JSON.parse(
      (await runCli(['compare', join(FIX, 'clean'), join(FIX, 'stop-off-path'), '--json', '--no-audit', '--fail-on-trip-loss', '10']))
        .stdout,
    );
    expectValid('compare', lean);
    expect(lean.candidates).toBeNull();
  });

  it('the error document of a failed --json run', async () => {
    const r = await runCli(['check', join(dir, 'no-such-feed.zip'), '--json']);
    expect(r.code).toBe(2);
    const doc = JSON.parse(r.stdout);
    expectValid('error', doc);
    expect(doc).toMatchObject({ exit_code: 2, error: { code: 'feed-unreadable' } });
  });

  it('a document missing a required key or with a camelCase key does not validate', () => {
    const bad = { schema_version: 1, tool: { name: 'stopspan', version: '0' }, runs: [{ id: 1 }] };
    expect(SCHEMAS.history(bad)).toBe(false);
    const err = { schema_version: 1, tool: { name: 'stopspan', version: '0' }, error: { code: 'x', message: 'y' }, exitCode: 2 };
    expect(SCHEMAS.error(err)).toBe(false);
  });
});

describe('package', () => {
  it('exports every schema in schema/ through package.json "exports"', async () => {
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'));
    expect(pkg.exports['./schema/*']).toBe('./schema/*');
    expect(pkg.files).toContain('schema');
    // resolved as a user's import would (the package names itself)
    const { createRequire } = await import('node:module');
    const req = createRequire(join(ROOT, 'package.json'));
    for (const name of ['summary', 'check', 'compare', 'history', 'error']) {
      expect(req.resolve(`stopspan/schema/${name}.schema.json`)).toBe(join(ROOT, 'schema', `${name}.schema.json`));
    }
  });
});
