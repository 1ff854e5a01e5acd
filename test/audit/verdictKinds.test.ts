// The verdict table against the README and the page: the README's verdicts paragraph gives each verdict
// with the table's meaning, its stops.csv row lists the same verdicts, and the page's script carries the
// table's letters and legend (so neither can drift from the table).

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { GAP_VERDICTS, STOP_VERDICTS, VERDICTS } from '../../src/audit/verdictKinds.js';
import type { Verdict } from '../../src/audit/types.js';
import { PAGE_SCRIPT } from '../../src/report/html/pageScript.js';

const README = readFileSync(join(import.meta.dirname, '..', '..', 'README.md'), 'utf8').replace(/\n\s*/g, ' ');
const KINDS = Object.entries(VERDICTS) as [Verdict, (typeof VERDICTS)[Verdict]][];

describe('the verdict table', () => {
  it('has one letter per verdict', () => {
    expect(new Set(KINDS.map(([, k]) => k.letter)).size).toBe(KINDS.length);
  });

  it("is the README's: each verdict with its meaning, and the same verdicts in stops.csv", () => {
    for (const [v, k] of KINDS) expect(README, v).toContain(`\`${v}\` (${k.meaning})`);
    const csv = /verdict \(([^)]*)\)/.exec(README);
    expect(csv).not.toBeNull();
    expect([...csv![1].matchAll(/`([a-z]+)`/g)].map((m) => m[1]).sort()).toEqual(KINDS.map(([v]) => v).sort());
  });

  it("is the README's for the stop's own verdict and the gaps' verdicts too, each with its meaning", () => {
    for (const [v, meaning] of [...Object.entries(STOP_VERDICTS), ...Object.entries(GAP_VERDICTS)])
      expect(README, v).toContain(`\`${v}\` (${meaning})`);
  });

  it("is the page's: the letters the script reads and the legend it draws", () => {
    expect(PAGE_SCRIPT).toContain(`var VERDICT_TEXT = { C: 'close', W: 'wide', O: 'ok', F: 'fixed' };`);
    for (const [v, k] of KINDS) {
      expect(PAGE_SCRIPT).toContain(`${k.letter}: '${v}'`);
      expect(PAGE_SCRIPT).toContain(`['${k.letter}', '${k.legend}']`);
    }
  });
});
