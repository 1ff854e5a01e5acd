// The command line's engine tuning (src/cli/engineTuning.ts): a larger V8 interrupt budget and a smaller
// heap growth, unless node was given its own. Checked against V8 itself: its --trace-opt log counts the
// functions it optimised, and the kernel's peak resident set (getrusage) measures the heap growth.

import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { CLI_HEAP_GROWING_PERCENT, CLI_INTERRUPT_BUDGET, engineFlagGiven, interruptBudgetGiven } from '../../src/cli/engineTuning.js';
import { ROOT, runCli } from '../helpers/cli.js';

const dirs: string[] = [];
afterAll(() => dirs.forEach((d) => rmSync(d, { recursive: true, force: true })));

describe('engine tuning of the command line', () => {
  it('sees a budget given to node on its command line or in NODE_OPTIONS, and nothing else', () => {
    expect(interruptBudgetGiven(['--interrupt-budget=1000'], undefined)).toBe(true);
    expect(interruptBudgetGiven(['--interrupt_budget=1000'], undefined)).toBe(true);
    expect(interruptBudgetGiven([], '--max-old-space-size=512 --interrupt-budget=5000')).toBe(true);
    expect(interruptBudgetGiven(['--interrupt-budget-scale-factor=2'], '')).toBe(false);
    expect(interruptBudgetGiven(['--expose-gc'], '--max-old-space-size=512')).toBe(false);
    expect(CLI_INTERRUPT_BUDGET).toBeGreaterThan(67_584); // V8's default in Node 20 (node --v8-options)
  });

  it('has V8 optimise fewer functions in an audit than with its default budget', async () => {
    const optimised = async (nodeArgs: string[]): Promise<number> => {
      const out = mkdtempSync(join(tmpdir(), 'stopspan-engine-'));
      dirs.push(out);
      const r = await runCli(['audit', join(ROOT, 'fixtures/demo/demo-feed.zip'), '--out', join(out, 'r'), '-q'], {
        nodeArgs: ['--trace-opt', ...nodeArgs],
      });
      expect(r.code).toBe(0);
      return (r.stdout.match(/^\[completed compiling .*TURBOFAN/gm) ?? []).length;
    };
    const tuned = await optimised([]);
    const v8Default = await optimised(['--interrupt-budget=67584']);
    expect(tuned).toBeGreaterThan(0);
    // measured on the demo feed: about 37 against 70; timing moves these a little, not by a third
    expect(tuned).toBeLessThan(v8Default * 0.8);
  });

  it('sees a heap growth given to node, and nothing else', () => {
    expect(engineFlagGiven('heap-growing-percent', ['--heap-growing-percent=0'], undefined)).toBe(true);
    expect(engineFlagGiven('heap-growing-percent', [], '--heap_growing_percent=50')).toBe(true);
    expect(engineFlagGiven('heap-growing-percent', ['--interrupt-budget=1000'], '--max-old-space-size=512')).toBe(false);
    expect(CLI_HEAP_GROWING_PERCENT).toBeLessThan(100);
  });

  const MANHATTAN = join(ROOT, '../shared/feeds/nyct-bus-manhattan.zip');
  it.skipIf(!existsSync(MANHATTAN))(
    "keeps the audit's peak memory on a real feed below V8's own heap growth",
    async () => {
      const out = mkdtempSync(join(tmpdir(), 'stopspan-engine-'));
      dirs.push(out);
      // the kernel's peak resident set of the process, written as it exits
      const preload = join(out, 'peak.mjs');
      writeFileSync(
        preload,
        "import { writeFileSync } from 'node:fs';\nprocess.on('exit', () => writeFileSync(process.env.PEAK_FILE, String(process.resourceUsage().maxRSS)));\n",
      );
      const peakKb = async (tag: string, nodeArgs: string[]): Promise<number> => {
        process.env.PEAK_FILE = join(out, `${tag}.kb`);
        const r = await runCli(['audit', MANHATTAN, '--out', join(out, tag), '-q'], { nodeArgs: ['--import', preload, ...nodeArgs] });
        expect(r.code, r.stderr).toBe(0);
        return Number(readFileSync(join(out, `${tag}.kb`), 'utf8'));
      };
      try {
        const tuned = await peakKb('tuned', []);
        // 0 is V8's own rule (grow by up to four times what survived), left as given
        const v8Default = await peakKb('default', ['--heap-growing-percent=0']);
        // measured: about 170 MB against 189 MB; the live heap is the same, only the garbage held differs
        expect(tuned).toBeLessThan(v8Default * 0.95);
      } finally {
        delete process.env.PEAK_FILE;
      }
    },
    120_000,
  );
});
