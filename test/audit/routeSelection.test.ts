// Filters that filter: --routes, --exclude-routes and --route-types choose what is reported, while every
// figure is computed on the whole network, so a route's rows are the same whichever others were asked for.
// Hand-made network in the invented city of Vellmoor, and the real Manhattan bus feed when present.
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runAudit } from '../../src/audit/runAudit.js';
import { auditFeed } from '../../src/audit/auditFeed.js';
import { selectedRoutes } from '../../src/audit/routeSelection.js';
import type { AuditResult } from '../../src/audit/types.js';
import { handmadeNetwork } from '../helpers/handmade.js';
import { thrown } from '../helpers/errors.js';

const params = { cruise_speed_mps: 11.176 };

function rowsOf(r: AuditResult, routeId: string) {
  return {
    patterns: r.patterns.filter((p) => p.routeId === routeId),
    stops: r.stops.filter((s) => s.routeId === routeId),
    gaps: r.gaps.filter((g) => r.patterns.some((p) => p.patternId === g.patternId && p.routeId === routeId)),
    candidates: r.candidates.filter((c) => c.routeIds.includes(routeId)).map((c) => ({ ...c, rank: 0 })),
  };
}

describe('route selection', () => {
  it('resolves ids, short names, exclusions and route types', () => {
    const { feed } = handmadeNetwork();
    expect(selectedRoutes(feed, {})).toBeNull();
    expect([...selectedRoutes(feed, { routes: ['2'] })!]).toEqual(['V2']);
    expect([...selectedRoutes(feed, { excludeRoutes: ['V1'] })!]).toEqual(['V2']);
    expect([...selectedRoutes(feed, { routeTypes: ['bus'] })!].sort()).toEqual(['V1', 'V2']);
    expect([...selectedRoutes(feed, { routeTypes: ['3'] })!].sort()).toEqual(['V1', 'V2']);
    expect(selectedRoutes(feed, { routeTypes: ['rail'] })!.size).toBe(0);
    expect(thrown(() => selectedRoutes(feed, { excludeRoutes: ['V9'] })).message).toMatch(/--exclude-routes.*V9/);
    expect(thrown(() => selectedRoutes(feed, { routeTypes: ['hovercraft'] })).message).toMatch(/--route-types/);
  });

  it('reports only the routes asked for, with the figures of the full run', () => {
    const { feed, patterns } = handmadeNetwork();
    const full = runAudit(feed, patterns, { params, generatedAt: 'x' });
    for (const id of ['V1', 'V2']) {
      const only = runAudit(feed, patterns, { params, generatedAt: 'x', reportRoutes: new Set([id]) });
      expect(only.patterns.every((p) => p.routeId === id)).toBe(true);
      expect(only.headline.patterns).toBe(1);
      expect(rowsOf(only, id)).toEqual(rowsOf(full, id));
    }
  });

  it('counts the reported routes in the sensitivity cases, like the headline', () => {
    // V1 with stops 100 m apart, dense enough to lose riders' time in every case
    const { feed, patterns } = handmadeNetwork({ distM: Array.from({ length: 31 }, (_, k) => 100 * k), sharedAt: 15 });
    const full = runAudit(feed, patterns, { params, generatedAt: 'x' });
    const [r1, r2] = ['V1', 'V2'].map((id) => runAudit(feed, patterns, { params, generatedAt: 'x', reportRoutes: new Set([id]) }));
    // the two routes' cases add up to the full run's
    full.sensitivity.forEach((c, k) => {
      expect(c.paxMinLostPerDay).toBeGreaterThan(0);
      expect(r1.sensitivity[k].paxMinLostPerDay + r2.sensitivity[k].paxMinLostPerDay).toBeCloseTo(c.paxMinLostPerDay, 6);
      expect(r1.sensitivity[k].closeStops + r2.sensitivity[k].closeStops).toBe(c.closeStops);
    });
    // V2's middle stop is V1's too: fixed (with its reason) in V2's report as in the full run
    const v2 = runAudit(feed, patterns, { params, generatedAt: 'x', reportRoutes: new Set(['V2']) });
    expect(v2.stops[1].verdict).toBe('fixed');
    expect(v2.stops[1].fixedReason).not.toBe('');
  });
});

const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');
const BUS = join(FEEDS, 'nyct-bus-manhattan.zip');
const have = existsSync(BUS);
if (!have) console.warn(`skipping the real-feed route selection: ${BUS} not found (set STOPSPAN_FEEDS)`);

describe.skipIf(!have)('route selection on nyct-bus-manhattan.zip', () => {
  it('gives M15 and M101 the rows they have in the full run', async () => {
    const date = '2026-10-14';
    const full = (await auditFeed(BUS, { date })).result;
    const some = (await auditFeed(BUS, { date, routes: ['M15', 'M101'] })).result;
    const ids = [...new Set(some.patterns.map((p) => p.routeId))].sort();
    expect(ids.length).toBe(2);
    for (const id of ids) {
      const a = rowsOf(some, id);
      expect(a.stops.length).toBeGreaterThan(20);
      expect(a).toEqual(rowsOf(full, id));
    }
    const without = (await auditFeed(BUS, { date, excludeRoutes: ['M15'] })).result;
    expect(without.patterns.some((p) => p.routeId === ids.find((x) => x.includes('M15')))).toBe(false);
    expect(without.headline.patterns).toBe(full.headline.patterns - some.patterns.filter((p) => p.routeShortName === 'M15').length);
  }, 600_000);
});
