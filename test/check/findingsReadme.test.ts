// The README's table of check findings is tested against the findings table (src/check/findings.ts): the
// same codes in the same order, each with its default severity, so a finding added, dropped or re-ranked in
// the code cannot leave the README behind. The README's words may be shorter than the table's explanation.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { FINDINGS, FINDING_CODES } from '../../src/check/findings.js';

describe("the README's findings", () => {
  it('are the table of findings: every code in order, with its default severity', () => {
    const readme = readFileSync(join(import.meta.dirname, '..', '..', 'README.md'), 'utf8');
    const start = readme.indexOf('| finding | severity | what it means | threshold |');
    expect(start).toBeGreaterThan(0);
    const rows = readme.slice(start).split('\n').slice(2);
    const table = rows.slice(
      0,
      rows.findIndex((l) => !l.startsWith('|')),
    );
    const listed = table.map((l) => {
      const m = /^\| `([a-z-]+)` \| (error|warning|info) \|/.exec(l);
      expect(m, l).not.toBeNull();
      return [m![1], m![2]];
    });
    expect(listed).toEqual(FINDING_CODES.map((c) => [c, FINDINGS[c].severity]));
  });
});
