// The command line's engine tuning (src/cli/engineTuning.ts): a larger V8 interrupt budget, unless node
// was given one. Checked against V8 itself: its --trace-opt log counts the functions it optimised.

import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { CLI_INTERRUPT_BUDGET, interruptBudgetGiven } from '../../src/cli/engineTuning.js';
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
      const r = await runCli(['audit', join(ROOT, 'fixtures/demo/demo-feed.zip'), '--out', join(out, 'r'), '-q'], { nodeArgs: ['--trace-opt', ...nodeArgs] });
      expect(r.code).toBe(0);
      return (r.stdout.match(/^\[completed compiling .*TURBOFAN/gm) ?? []).length;
    };
    const tuned = await optimised([]);
    const v8Default = await optimised(['--interrupt-budget=67584']);
    expect(tuned).toBeGreaterThan(0);
    // measured on the demo feed: about 37 against 70; timing moves these a little, not by a third
    expect(tuned).toBeLessThan(v8Default * 0.8);
  });
});
