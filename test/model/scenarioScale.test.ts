// The scenario engine grows in time linearly with a pattern's stops: a plan removing every other stop of
// a long pattern (what the audit weighs for a pattern of stops a few metres apart) is resolved and
// weighed in time near proportional to the stops, not their square.
import { describe, expect, it } from 'vitest';
import { prepareAudit } from '../../src/audit/prepareAudit.js';
import { effectOf, resolveChanges, type PatternEdit } from '../../src/model/scenario.js';
import { handmadeNetwork } from '../helpers/handmade.js';

const params = { walk_speed_mps: 1.2, walk_weight: 2 };

/** The V1 pattern of n stops 20 m apart, every other stop but the ends removed, ready for effectOf. */
function everyOtherRemoved(n: number) {
  const { feed, patterns } = handmadeNetwork({ distM: Array.from({ length: n }, (_, j) => j * 20), sharedAt: 1 });
  const { preps, params: p } = prepareAudit(feed, patterns, { params });
  const prep = preps.find((x) => x.pattern.routeId === 'V1')!;
  const removed = new Set<number>();
  for (let m = 1; m + 1 < prep.modelStops.length; m += 2) if (prep.fixedReason[m] === '') removed.add(m);
  const edit: PatternEdit = { prep, removed, moved: new Map(), added: [] };
  return { feed, edit, p, preps, date: patterns.date };
}

describe('scenario engine at scale', () => {
  it('weighs a plan removing every other stop in time near linear in the stops', () => {
    const time = (n: number): { ms: number; changes: number } => {
      const { feed, edit, p } = everyOtherRemoved(n);
      let e = effectOf(feed, edit, p, 2); // warm the code up on this size
      // a removed stop had neighbours 20 m either side and leaves a 40 m gap [D: stops 20 m apart, every other one removed]
      const mid = e.changes[Math.floor(e.changes.length / 2)];
      expect(mid.gapsBeforeM.map((g) => Math.round(g * 1e6) / 1e6)).toEqual([20, 20]);
      expect(mid.gapsAfterM.map((g) => Math.round(g * 1e6) / 1e6)).toEqual([40]);
      let ms = Infinity; // the least of three runs: the machine's noise only ever adds
      for (let r = 0; r < 3; r++) {
        const t0 = performance.now();
        e = effectOf(feed, edit, p, 2);
        ms = Math.min(ms, performance.now() - t0);
      }
      return { ms, changes: e.changes.length };
    };
    time(1000);
    const small = time(5000);
    const large = time(20_000);
    expect(small.changes).toBeGreaterThan(2000);
    expect(large.changes).toBeGreaterThan(8000);
    // four times the stops: about four times the time when linear, sixteen when quadratic
    expect(large.ms / small.ms, `${small.ms.toFixed(1)} ms -> ${large.ms.toFixed(1)} ms`).toBeLessThan(7.5);
  }, 120_000);

  it('resolves a plan naming every other stop of a long pattern in time near linear in the stops', () => {
    const time = (n: number): { ms: number; removed: number } => {
      const { feed, edit, preps, date } = everyOtherRemoved(n);
      const ids = [...edit.removed].map((m) => feed.stops[edit.prep.pattern.stopIdx[edit.prep.modelStops[m]]].id);
      const plan = { remove: ids.map((stop) => ({ stop, patterns: [edit.prep.pattern.id] })) };
      let got = resolveChanges(feed, date, preps, plan); // warm the code up on this size
      let ms = Infinity; // the least of three runs: the machine's noise only ever adds
      for (let r = 0; r < 3; r++) {
        const t0 = performance.now();
        got = resolveChanges(feed, date, preps, plan);
        ms = Math.min(ms, performance.now() - t0);
      }
      return { ms, removed: got.get(edit.prep.pattern.id)!.removed.size };
    };
    time(1000);
    const small = time(5000);
    const large = time(20_000);
    expect(small.removed).toBeGreaterThan(2000);
    expect(large.removed).toBeGreaterThan(8000);
    // four times the stops: about four times the time when linear, sixteen when quadratic
    expect(large.ms / small.ms, `${small.ms.toFixed(1)} ms -> ${large.ms.toFixed(1)} ms`).toBeLessThan(7.5);
  }, 120_000);
});
