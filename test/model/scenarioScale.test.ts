// The scenario engine grows in time linearly with a pattern's stops: a plan removing every other stop of
// a long pattern (what the audit weighs for a pattern of stops a few metres apart) is resolved and
// weighed in time near proportional to the stops, not their square.
import { describe, expect, it } from 'vitest';
import { prepareAudit } from '../../src/audit/prepareAudit.js';
import { effectOf, resolveChanges, type PatternEdit } from '../../src/model/scenario.js';
import { growthRatio } from '../helpers/growth.js';
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
  // a pattern of 20 000 stops against sixteen of 1 250: near 1 when linear, 16 or more when quadratic; the
  // large case's bigger maps and sets cost it up to about 3 times on this machine (garbage collection, caches)
  const SMALL = 1250;
  const K = 16;

  it('weighs a plan removing every other stop in time near linear in the stops', () => {
    const weigh = (n: number) => {
      const { feed, edit, p } = everyOtherRemoved(n);
      const e = effectOf(feed, edit, p, 2);
      expect(e.changes.length).toBeGreaterThan(0.49 * n);
      // a removed stop had neighbours 20 m either side and leaves a 40 m gap [D: stops 20 m apart, every other one removed]
      const mid = e.changes[Math.floor(e.changes.length / 2)];
      expect(mid.gapsBeforeM.map((g) => Math.round(g * 1e6) / 1e6)).toEqual([20, 20]);
      expect(mid.gapsAfterM.map((g) => Math.round(g * 1e6) / 1e6)).toEqual([40]);
      return () => effectOf(feed, edit, p, 2);
    };
    const { ratio, text } = growthRatio(weigh(SMALL), weigh(SMALL * K), K);
    expect(ratio, text).toBeLessThan(8);
  }, 120_000);

  it('resolves a plan naming every other stop of a long pattern in time near linear in the stops', () => {
    const resolve = (n: number) => {
      const { feed, edit, preps, date } = everyOtherRemoved(n);
      const ids = [...edit.removed].map((m) => feed.stops[edit.prep.pattern.stopIdx[edit.prep.modelStops[m]]].id);
      const plan = { remove: ids.map((stop) => ({ stop, patterns: [edit.prep.pattern.id] })) };
      const got = resolveChanges(feed, date, preps, plan);
      expect(got.get(edit.prep.pattern.id)!.removed.size).toBe(edit.removed.size);
      expect(edit.removed.size).toBeGreaterThan(0.49 * n);
      return () => resolveChanges(feed, date, preps, plan);
    };
    const { ratio, text } = growthRatio(resolve(SMALL), resolve(SMALL * K), K);
    expect(ratio, text).toBeLessThan(8);
  }, 120_000);
});
