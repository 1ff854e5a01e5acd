// Sensitivity cases: reusing the base audit for the case whose settings are the base's own gives exactly
// what computing every case afresh gives, and that case agrees with the base audit's own headline.
import { describe, expect, it } from 'vitest';
import { buildCandidates } from '../../src/audit/candidates.js';
import { prepareAudit } from '../../src/audit/prepareAudit.js';
import { runSensitivity, sensitivitySettings } from '../../src/audit/sensitivity.js';
import { analysePattern } from '../../src/audit/verdicts.js';
import { handmadeNetwork } from '../helpers/handmade.js';

// stops about 110 m apart over 6 km, some nudged off the grid, so there are close stops and candidates
const spacing = Array.from({ length: 56 }, (_, j) => j * 110 + (j % 3 === 0 ? 0 : 8));

describe('runSensitivity', () => {
  const { feed, patterns } = handmadeNetwork({ distM: spacing, tripsPerDay: 80 });
  const { params, preps } = prepareAudit(feed, patterns, { params: { cruise_speed_mps: 11.176, stopping_model: 'always' } });
  const baseAnalyses = preps.map((p) => analysePattern(feed, p, params));
  const baseCandidates = buildCandidates(feed, baseAnalyses, { maxGapM: params.max_gap_m });

  it('gives the same cases and robust candidates whether the base audit is reused or not', () => {
    expect(baseCandidates.length).toBeGreaterThan(0); // the comparison is about something
    const a = baseCandidates.map((c) => ({ ...c }));
    const b = baseCandidates.map((c) => ({ ...c }));
    const fresh = runSensitivity(feed, preps, params, a);
    const reused = runSensitivity(feed, preps, params, b, { baseAnalyses });
    expect(reused.cases).toEqual(fresh.cases);
    expect(b.map((c) => c.robust)).toEqual(a.map((c) => c.robust));
  });

  it('reuses the base only for the case at the base settings: band tolerance 0.05 by default', () => {
    // the defaults of src/model/params.ts: band tolerance 0.05, walk weight 2
    expect(params.band_tolerance).toBe(0.05);
    const settings = sensitivitySettings(params);
    const same = settings.filter((s) => s.walkWeight === params.walk_weight && s.bandTolerance === params.band_tolerance);
    expect(same.map((s) => s.label)).toEqual(['band_tolerance=0.05']);
    const { cases } = runSensitivity(feed, preps, params, baseCandidates, { baseAnalyses });
    const c = cases.find((x) => x.label === 'band_tolerance=0.05')!;
    expect(c.closeStops).toBe(baseAnalyses.reduce((n, a) => n + a.result.closeStops, 0));
    expect(c.candidatesKept).toBe(Math.min(10, baseCandidates.length));
    // the other cases are computed: a different walk weight moves the optimum [square-root law: spacing
    // grows as 1/sqrt(walk weight), so 1.5 gives a wider optimum than 2.5]
    const w15 = cases.find((x) => x.label === 'walk_weight=1.5')!;
    const w25 = cases.find((x) => x.label === 'walk_weight=2.5')!;
    expect(w15.meanOptimalSpacingM).toBeGreaterThan(w25.meanOptimalSpacingM);
  });
});
