// Robustness judged on the programme as accepted: under each sensitivity case the same ordered list is
// weighed again, each candidate given those ranked above it, and a candidate is robust when its marginal
// net is a saving in every case. Checked by exact enumeration: the marginal of rank k at a case's walk
// weight is whatif of the first k minus whatif of the first k-1, each weighed afresh at that walk weight.
import { describe, expect, it } from 'vitest';
import { handmadeNetwork } from '../helpers/handmade.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { evaluateScenario } from '../../src/whatif/whatif.js';
import { programmeScenario } from '../../src/audit/programme.js';
import { programmeUnderCases, sensitivitySettings } from '../../src/audit/sensitivity.js';
import { defaultParams } from '../../src/model/params.js';

describe('robustness of the programme', () => {
  it.each([
    ['uniform close stops', Array.from({ length: 16 }, (_, k) => k * 50)],
    ['uneven stops with a wide gap', [0, 90, 170, 260, 330, 900, 980, 1050, 1130, 1210, 1290, 1800, 1870, 1950]],
  ])(
    '%s: each case weighs the same ordered list again, exactly as whatif of every prefix does',
    (_, distM) => {
      const { feed, patterns } = handmadeNetwork({ distM, tripsPerDay: 80, sharedAt: 4 });
      const r = runAudit(feed, patterns, { generatedAt: '2026-01-01T00:00:00Z' });
      expect(r.candidates.length).toBeGreaterThan(1);
      const params = defaultParams();
      const cases = programmeUnderCases(r.candidates, params, sensitivitySettings(params));
      for (const [k, s] of sensitivitySettings(params).entries()) {
        // [D] exact enumeration: rank i's marginal is the joint figure of the first i less that of the first i-1
        let before = 0;
        r.candidates.forEach((_, i) => {
          const joint = evaluateScenario(feed, patterns, programmeScenario(r.candidates.slice(0, i + 1)), {
            params: { walk_weight: s.walkWeight },
          }).totals.netPaxMinPerDay;
          expect(cases[k].marginalNetPaxMinPerDay[i], `${s.label}, rank ${i + 1}`).toBeCloseTo(joint - before, 6);
          before = joint;
        });
        expect(cases[k].netPaxMinPerDay).toBeCloseTo(before, 6);
        // the audit's own case rows carry the same figures
        const row = r.sensitivity.find((x) => x.label === s.label)!;
        expect(row.programmeNetPaxMinPerDay).toBeCloseTo(before, 6);
        expect(row.programmeStillSaving).toBe(cases[k].marginalNetPaxMinPerDay.filter((m) => m < 0).length);
      }
      // robust: a saving in every case, given those ranked above it
      r.candidates.forEach((c, i) => expect(c.robust, `rank ${i + 1}`).toBe(cases.every((x) => x.marginalNetPaxMinPerDay[i] < 0)));
    },
    120_000,
  );

  it('marks a candidate whose marginal turns into a loss at walk weight 2.5 as not robust', () => {
    // close stops 50 m apart: late in the list a removal joins walks already long, and at walk weight 2.5
    // its marginal turns into a loss while the early ones stay savings
    const { feed, patterns } = handmadeNetwork({ distM: Array.from({ length: 16 }, (_, k) => k * 50), tripsPerDay: 80, sharedAt: 4 });
    const r = runAudit(feed, patterns, { generatedAt: '2026-01-01T00:00:00Z' });
    expect(r.candidates.some((c) => c.robust)).toBe(true);
    expect(r.candidates.some((c) => !c.robust)).toBe(true);
    const w25 = r.sensitivity.find((s) => s.label === 'walk_weight=2.5')!;
    expect(w25.programmeStillSaving).toBeLessThan(r.candidates.length);
    // the band cases weigh the same list at the base walk weight: every candidate still saves time there
    for (const s of r.sensitivity.filter((x) => x.walkWeight === 2)) expect(s.programmeStillSaving).toBe(r.candidates.length);
  });
});
