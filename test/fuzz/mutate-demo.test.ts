// Property-based fuzz of the whole pipeline: the demo feed's tables (cut down to three routes, see
// demoTables.ts) are mutated by fast-check (a row dropped or duplicated, two cells swapped, a cell
// replaced by junk, nothing, a huge number, markup or quote characters, written quoted or raw, a column
// dropped), written as a feed folder, and audited. Either the audit succeeds and its outputs agree with
// each other (every stops.csv row names a pattern in patterns.csv, gaps are non-negative, a pattern's
// gaps add up to its length, summary.json parses), or it fails with a StopspanError (CLI: exit 2, one
// stderr line, no stack frames, no output folder). Anything else is a bug, reported with the seed.
// Seeded for replay: STOPSPAN_FUZZ_SEED=<n> (and STOPSPAN_FUZZ_PATH=<path> from a failure message)
// reruns a failing case; STOPSPAN_FUZZ_RUNS and STOPSPAN_FUZZ_MAX_MUTATIONS (per run) widen a search.
// Half the in-process runs write the feed as a zip (yazl) instead of a folder, so both readers are fuzzed.

import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parse } from 'csv-parse/sync';
import { auditFeed } from '../../src/audit/auditFeed.js';
import { writeReport } from '../../src/report/writeReport.js';
import { isStopspanError } from '../../src/common/errors.js';
import { ROOT, cloneTables, demoBase, writeFeedFolder, writeFeedZip, type Tables } from './demoTables.js';
import { CLI } from '../helpers/cli.js';

const SEED = process.env.STOPSPAN_FUZZ_SEED !== undefined ? Number(process.env.STOPSPAN_FUZZ_SEED) : 20261201;
const PATH = process.env.STOPSPAN_FUZZ_PATH; // fast-check's replay path, printed with a failure
const RUNS = Number(process.env.STOPSPAN_FUZZ_RUNS ?? 50);
const MAX_MUTATIONS = Number(process.env.STOPSPAN_FUZZ_MAX_MUTATIONS ?? 4);
const CLI_RUNS = 4;
console.log(
  `test/fuzz/mutate-demo.test.ts: seed ${SEED} (replay with STOPSPAN_FUZZ_SEED=${SEED}), ${RUNS} in-process runs, ${CLI_RUNS} CLI runs`,
);

// ---------------------------------------------------------------------------------------------------
// Mutations

type Mutation =
  | { kind: 'drop-row'; table: string; row: number }
  | { kind: 'duplicate-row'; table: string; row: number }
  | { kind: 'swap-cells'; table: string; a: [number, number]; b: [number, number] }
  | { kind: 'corrupt-cell'; table: string; row: number; col: number; value: string; raw: boolean }
  | { kind: 'perturb-number'; table: string; row: number; col: number; scale: number; shift: number }
  | { kind: 'swap-rows'; table: string; a: number; b: number }
  | { kind: 'corrupt-header'; table: string; col: number; value: string }
  | { kind: 'drop-column'; table: string; col: number };

/** Junk a cell may become: random text, nothing, huge or odd numbers, markup, quote and line characters. */
const junk = fc.oneof(
  fc.string({ maxLength: 12 }),
  fc.string({ unit: 'binary', maxLength: 8 }), // any code point, NUL and lone surrogates included
  fc.constant(''),
  fc.constantFrom('1e308', '-1e308', '1e400', '99999999999999999999999', '9007199254740993', 'NaN', 'Infinity', '-0', '0x1F', '2147483648'),
  fc.integer().map(String),
  fc.double().map(String),
  fc.constantFrom('<img src=x onerror=alert(1)>', '</script><script>alert(1)</script>', '"onmouseover="alert(1)', '=HYPERLINK("http://x")'),
  fc.constantFrom('"', '""', 'a"b', '"open', "'", ',', ',,', '\n', '\r\n', '\r', ' "x" '),
  fc.constantFrom('25:99:00', '-1:00:00', '99:00:00', '20261302', '00000000', ' 1 ', '\u00a0', '\ufeff'),
);

function mutationArb(tables: string[]): fc.Arbitrary<Mutation> {
  const table = fc.constantFrom(...tables);
  const ix = fc.nat({ max: 1_000_000 }); // reduced modulo the table's size when applied
  return fc.oneof(
    fc.record({ kind: fc.constant('drop-row' as const), table, row: ix }),
    fc.record({ kind: fc.constant('duplicate-row' as const), table, row: ix }),
    fc.record({ kind: fc.constant('swap-cells' as const), table, a: fc.tuple(ix, ix), b: fc.tuple(ix, ix) }),
    // corruption twice as likely: it is where most of the value parsing lives
    fc.record({ kind: fc.constant('corrupt-cell' as const), table, row: ix, col: ix, value: junk, raw: fc.boolean() }),
    fc.record({ kind: fc.constant('corrupt-cell' as const), table, row: ix, col: ix, value: junk, raw: fc.boolean() }),
    // a plausible-looking number gone wrong: the cell's own value scaled or shifted (negative, zero, huge)
    fc.record({
      kind: fc.constant('perturb-number' as const),
      table,
      row: ix,
      col: ix,
      scale: fc.constantFrom(-1, 0, 1, 0.001, 1000, 1e9),
      shift: fc.constantFrom(0, -1, 1, -1000, 0.5, 86400),
    }),
    fc.record({ kind: fc.constant('swap-rows' as const), table, a: ix, b: ix }),
    // a column name renamed, blanked, repeated from another column, or given a BOM or padding
    fc.record({
      kind: fc.constant('corrupt-header' as const),
      table,
      col: ix,
      value: fc.oneof(junk, fc.constantFrom('stop_id', 'trip_id', 'route_id', 'shape_id', ' stop_id', 'STOP_ID', '\ufeffstop_id')),
    }),
    fc.record({ kind: fc.constant('drop-column' as const), table, col: ix }),
  );
}

function apply(tables: Tables, m: Mutation): void {
  const t = tables[m.table];
  const n = t.rows.length;
  const w = t.header.length;
  switch (m.kind) {
    case 'drop-row':
      if (n) t.rows.splice(m.row % n, 1);
      break;
    case 'duplicate-row':
      if (n) t.rows.splice(m.row % n, 0, [...t.rows[m.row % n]]);
      break;
    case 'swap-cells': {
      if (!n) break;
      const [ra, ca] = [m.a[0] % n, m.a[1] % t.rows[m.a[0] % n].length];
      const [rb, cb] = [m.b[0] % n, m.b[1] % t.rows[m.b[0] % n].length];
      [t.rows[ra][ca], t.rows[rb][cb]] = [t.rows[rb][cb], t.rows[ra][ca]];
      break;
    }
    case 'corrupt-cell': {
      const r = n ? m.row % n : -1; // an empty table gets its header corrupted
      const cells = r < 0 ? t.header : t.rows[r];
      const c = m.col % cells.length;
      cells[c] = m.value;
      if (m.raw) t.raw!.add(`${r}:${c}`);
      else t.raw!.delete(`${r}:${c}`);
      break;
    }
    case 'perturb-number': {
      if (!n) break;
      const row = t.rows[m.row % n];
      // the first numeric cell at or after the chosen column, so the mutation lands on a number
      for (let k = 0; k < row.length; k++) {
        const c = (m.col + k) % row.length;
        const v = Number(row[c]);
        if (row[c] !== '' && Number.isFinite(v)) {
          row[c] = String(v * m.scale + m.shift);
          break;
        }
      }
      break;
    }
    case 'swap-rows':
      if (n) [t.rows[m.a % n], t.rows[m.b % n]] = [t.rows[m.b % n], t.rows[m.a % n]];
      break;
    case 'corrupt-header':
      t.header[m.col % w] = m.value;
      t.raw!.delete(`-1:${m.col % w}`);
      break;
    case 'drop-column': {
      const c = m.col % w;
      t.header.splice(c, 1);
      for (const row of t.rows) row.splice(c, 1);
      t.raw = new Set(); // positions moved; nothing raw remains after a column goes
      break;
    }
  }
}

// ---------------------------------------------------------------------------------------------------
// Checks on a finished report folder

type Row = Record<string, string>;
const csv = (dir: string, f: string): Row[] => parse(readFileSync(join(dir, f)), { columns: true }) as Row[]; // csv-parse, the outside parser

/** Returns a list of broken consistency rules (empty when the report agrees with itself). */
function inconsistencies(dir: string): string[] {
  const bad: string[] = [];
  const summary = JSON.parse(readFileSync(join(dir, 'summary.json'), 'utf8'));
  if (typeof summary !== 'object' || summary === null) bad.push('summary.json is not an object');
  JSON.parse(readFileSync(join(dir, 'stops.geojson'), 'utf8'));
  JSON.parse(readFileSync(join(dir, 'patterns.geojson'), 'utf8'));
  const patterns = csv(dir, 'patterns.csv');
  const stops = csv(dir, 'stops.csv');
  csv(dir, 'candidates.csv');
  const ids = new Set(patterns.map((p) => p.pattern_id));
  if (ids.size !== patterns.length) bad.push('patterns.csv repeats a pattern_id');
  const byPattern = new Map<string, Row[]>();
  for (const s of stops) {
    if (!ids.has(s.pattern_id)) bad.push(`stops.csv row for stop ${s.stop_id} names pattern ${s.pattern_id}, absent from patterns.csv`);
    for (const k of ['gap_before_m', 'gap_after_m', 'dist_along_m']) {
      if (s[k] === '') continue;
      const v = Number(s[k]);
      if (!Number.isFinite(v) || v < 0) bad.push(`stops.csv ${s.pattern_id} stop ${s.stop_id}: ${k} = ${JSON.stringify(s[k])}`);
    }
    const list = byPattern.get(s.pattern_id) ?? [];
    list.push(s);
    byPattern.set(s.pattern_id, list);
  }
  for (const [f, rows] of [
    ['patterns.csv', patterns],
    ['stops.csv', stops],
  ] as const) {
    for (const r of rows) for (const [k, v] of Object.entries(r)) if (/^-?(NaN|Infinity)$/.test(v)) bad.push(`${f} ${k} = ${v}`);
  }
  if (summary.counts?.patterns !== patterns.length)
    bad.push(`summary.json counts.patterns ${summary.counts?.patterns}, patterns.csv has ${patterns.length}`);
  if (summary.counts?.stop_rows !== stops.length)
    bad.push(`summary.json counts.stop_rows ${summary.counts?.stop_rows}, stops.csv has ${stops.length}`);
  for (const s of stops)
    if (!['close', 'wide', 'ok', 'fixed'].includes(s.verdict)) bad.push(`stops.csv verdict ${JSON.stringify(s.verdict)}`);
  const html = readFileSync(join(dir, 'index.html'), 'utf8');
  const block = /<script type="application\/json" id="report-data">([^<]*)<\/script>/.exec(html);
  if (!block) bad.push('index.html has no data block');
  else JSON.parse(block[1]);
  for (const p of patterns) {
    const rows = byPattern.get(p.pattern_id) ?? [];
    // stops in order along the path: indices 0..n-1, distance never decreasing, each gap the step in distance
    const ordered = [...rows].sort((a, b) => Number(a.stop_index) - Number(b.stop_index));
    ordered.forEach((r, i) => {
      if (Number(r.stop_index) !== i) bad.push(`pattern ${p.pattern_id}: stop_index ${r.stop_index} at position ${i}`);
      if (i === 0) return;
      const step = Number(r.dist_along_m) - Number(ordered[i - 1].dist_along_m);
      if (step < -0.05) bad.push(`pattern ${p.pattern_id}: dist_along_m falls from ${ordered[i - 1].dist_along_m} to ${r.dist_along_m}`);
      if (r.gap_before_m !== '' && Math.abs(step - Number(r.gap_before_m)) > 0.1 + 1e-6)
        bad.push(`pattern ${p.pattern_id}: gap_before_m ${r.gap_before_m} at index ${i}, distance step ${step.toFixed(2)}`);
    });
    if (Number(p.stop_count) !== rows.length)
      bad.push(`pattern ${p.pattern_id}: stop_count ${p.stop_count} but ${rows.length} rows in stops.csv`);
    const gaps = rows
      .map((r) => r.gap_before_m)
      .filter((g) => g !== '')
      .map(Number);
    const sum = gaps.reduce((a, b) => a + b, 0);
    const lengthM = Number(p.length_m);
    // each written gap and the length are rounded to 0.1 m, so they may differ by up to 0.05 m per figure
    const tol = 0.05 * (gaps.length + 1) + 1e-6;
    if (!Number.isFinite(lengthM) || lengthM < 0) bad.push(`pattern ${p.pattern_id}: length_m = ${JSON.stringify(p.length_m)}`);
    else if (Math.abs(sum - lengthM) > tol) bad.push(`pattern ${p.pattern_id}: gaps sum to ${sum.toFixed(2)} m, length_m is ${p.length_m}`);
  }
  return bad;
}

function describeMutations(ms: Mutation[]): string {
  return ms.map((m) => JSON.stringify(m)).join('; ');
}

// ---------------------------------------------------------------------------------------------------

let base: Tables;
let work = '';
let counter = 0;
const tally = { ok: 0, refused: 0, codes: new Map<string, number>() };

beforeAll(async () => {
  base = await demoBase();
  work = mkdtempSync(join(tmpdir(), 'stopspan-fuzz-'));
});
afterAll(() => {
  if (work) rmSync(work, { recursive: true, force: true });
  if (tally.ok + tally.refused > 0) {
    console.log(
      `fuzz outcome: ${tally.ok} audited, ${tally.refused} refused (${[...tally.codes].map(([c, n]) => `${c} ${n}`).join(', ')})`,
    );
  }
});

describe('the demo feed mutated', () => {
  it('has an unmutated base that audits cleanly and is consistent (the property holds before fuzzing)', async () => {
    const feed = join(work, 'base-feed');
    writeFeedFolder(cloneTables(base), feed);
    const { result } = await auditFeed(feed);
    expect(result.patterns.length).toBeGreaterThanOrEqual(4); // R1 both ways with a short turn, R40, R41
    const out = join(work, 'base-out');
    await writeReport(result, out);
    expect(inconsistencies(out)).toEqual([]);
  });

  it('the consistency check itself catches a report whose gaps do not add up', async () => {
    const feed = join(work, 'check-feed');
    writeFeedFolder(cloneTables(base), feed);
    const { result } = await auditFeed(feed);
    const stop = result.stops.find((s) => s.gapBeforeM !== null && s.gapBeforeM > 10)!;
    stop.gapBeforeM = stop.gapBeforeM! + 50; // a gap that no longer fits its pattern's length
    const out = join(work, 'check-out');
    await writeReport(result, out);
    expect(inconsistencies(out).some((b) => /gaps sum to/.test(b))).toBe(true);
  });

  it(`either audits consistently or refuses with a StopspanError (seed ${SEED}, ${RUNS} runs, in-process)`, async () => {
    const names = Object.keys(base).sort();
    await fc.assert(
      fc.asyncProperty(fc.array(mutationArb(names), { minLength: 1, maxLength: MAX_MUTATIONS }), fc.boolean(), async (ms, asZip) => {
        const k = counter++;
        const tables = cloneTables(base);
        for (const m of ms) apply(tables, m);
        const feed = join(work, asZip ? `feed-${k}.zip` : `feed-${k}`);
        const out = join(work, `out-${k}`);
        if (asZip) await writeFeedZip(tables, feed);
        else writeFeedFolder(tables, feed);
        try {
          let result;
          try {
            ({ result } = await auditFeed(feed));
          } catch (e) {
            if (!isStopspanError(e))
              throw new Error(`not a StopspanError after ${describeMutations(ms)}: ${(e as Error)?.stack ?? String(e)}`);
            if (/[\r\n]/.test(e.oneLine())) throw new Error(`error message spans lines: ${JSON.stringify(e.oneLine())}`);
            tally.refused++;
            tally.codes.set(e.code, (tally.codes.get(e.code) ?? 0) + 1);
            return;
          }
          await writeReport(result, out);
          const bad = inconsistencies(out);
          if (bad.length) throw new Error(`inconsistent report after ${describeMutations(ms)}:\n${bad.slice(0, 5).join('\n')}`);
          tally.ok++;
        } finally {
          rmSync(feed, { recursive: true, force: true });
          rmSync(out, { recursive: true, force: true });
        }
      }),
      { seed: SEED, numRuns: RUNS, path: PATH, endOnFailure: true },
    );
    expect(tally.ok + tally.refused).toBeGreaterThan(0); // every run ended in one of the two allowed ways
  });

  const haveCli = existsSync(CLI);
  if (!haveCli) console.warn(`test/fuzz/mutate-demo.test.ts: CLI runs skipped: ${CLI} is absent (npm run build)`);
  it.skipIf(!haveCli)(
    `through the built CLI: exit 0 with a consistent report, or exit 2 with one line and no folder (seed ${SEED + 1}, ${CLI_RUNS} runs)`,
    async () => {
      const names = Object.keys(base).sort();
      const seen = { 0: 0, 2: 0 };
      await fc.assert(
        fc.property(fc.array(mutationArb(names), { minLength: 1, maxLength: MAX_MUTATIONS }), (ms) => {
          const k = counter++;
          const tables = cloneTables(base);
          for (const m of ms) apply(tables, m);
          const feed = join(work, `cli-feed-${k}`);
          const out = join(work, `cli-out-${k}`);
          writeFeedFolder(tables, feed);
          try {
            const r = spawnSync(process.execPath, [CLI, 'audit', feed, '--out', out], { encoding: 'utf8', timeout: 60_000 });
            const what = `after ${describeMutations(ms)}: exit ${r.status}, signal ${r.signal}, stderr ${JSON.stringify(r.stderr)}`;
            if (r.signal !== null) throw new Error(`CLI killed ${what}`);
            if (/^\s+at /m.test(r.stderr)) throw new Error(`stack frames on stderr ${what}`);
            if (r.status === 2) {
              const lines = r.stderr.trimEnd().split('\n');
              if (lines.length !== 1 || !lines[0].startsWith('error: ')) throw new Error(`not one error line ${what}`);
              if (existsSync(out)) throw new Error(`output folder left behind ${what}`);
              const leftovers = readdirSync(work).filter((f) => f.includes(`cli-out-${k}.`));
              if (leftovers.length) throw new Error(`temporary folders left behind: ${leftovers.join(', ')} ${what}`);
              seen[2]++;
            } else if (r.status === 0) {
              const bad = inconsistencies(out);
              if (bad.length) throw new Error(`inconsistent report ${what}:\n${bad.slice(0, 5).join('\n')}`);
              seen[0]++;
            } else throw new Error(`unexpected exit ${what}`);
          } finally {
            rmSync(feed, { recursive: true, force: true });
            rmSync(out, { recursive: true, force: true });
          }
        }),
        { seed: SEED + 1, numRuns: CLI_RUNS, path: process.env.STOPSPAN_FUZZ_CLI_PATH, endOnFailure: true },
      );
      expect(seen[0] + seen[2]).toBeGreaterThan(0);
    },
  );
});
