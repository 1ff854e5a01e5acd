// The optimiser's plan: the stops it drops per pattern, as a scenario that whatif reads back unchanged,
// with joint figures that equal whatif's for the same file. On a hand-made Vellmoor network, and on
// nyct-bus-manhattan.zip when it is present (skipped otherwise).
import { describe, expect, it } from 'vitest';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { handmadeNetwork } from '../helpers/handmade.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { evaluateScenario, parseScenario } from '../../src/whatif/whatif.js';
import { stopsCsv } from '../../src/report/csv.js';
import { summaryObject } from '../../src/report/summaryJson.js';
import { readFeed } from '../../src/gtfs/readFeed.js';
import { buildPatterns } from '../../src/network/buildPatterns.js';
import { ROOT } from '../helpers/cli.js';

const MANHATTAN = join(ROOT, '..', 'shared', 'feeds', 'nyct-bus-manhattan.zip');

describe('the optimiser plan', () => {
  it('lists the dropped stops per pattern; whatif of plan.json gives the plan figures; optimiser_keeps ends each stops.csv row', () => {
    // close stops (60 m apart) on a long street: the optimiser drops some
    const distM = Array.from({ length: 25 }, (_, k) => k * 60);
    const { feed, patterns } = handmadeNetwork({ distM, tripsPerDay: 80, sharedAt: 12 });
    const r = runAudit(feed, patterns, { generatedAt: '2026-01-01T00:00:00Z' });
    expect(r.plan).toBeTruthy();
    const plan = r.plan!;
    const dropped = r.stops.filter((s) => !s.keptByOptimiser);
    expect(dropped.length).toBe(plan.dropsOnPatterns);
    expect(dropped.length).toBeGreaterThan(0);
    // the audit's own count of stops the optimiser keeps agrees with the plan (patterns.csv's optimal_stop_count)
    for (const p of r.patterns) {
      const kept = r.stops.filter((s) => s.patternId === p.patternId && s.keptByOptimiser).length;
      expect(kept, p.patternId).toBe(p.optimalStopCount);
    }
    // plan.json is a scenario: it reads back unchanged and whatif gives the plan's figures
    const text = JSON.stringify(plan.scenario, null, 2);
    const back = parseScenario(JSON.parse(text));
    expect(back).toEqual(plan.scenario);
    const w = evaluateScenario(feed, patterns, back, {});
    expect(w.totals.netPaxMinPerDay).toBeCloseTo(plan.figures.totals.netPaxMinPerDay, 6);
    expect(w.totals.vehicleHoursPerDay).toBeCloseTo(plan.figures.totals.vehicleHoursPerDay, 9);
    // [D] the optimiser minimises the same corridor cost whatif weighs, so the plan's joint net is minus the
    // passenger-minutes the audit says are lost (no operating cost set: the two objectives coincide)
    const lost = r.patterns.reduce((s, p) => s + p.paxMinLostPerDay, 0);
    expect(w.totals.netPaxMinPerDay).toBeCloseTo(-lost, 3);
    // stops.csv: optimiser_keeps follows the contract's columns, yes/no per row
    const lines = stopsCsv(r).trim().split('\r\n');
    const keeps = lines[0].split(',').indexOf('optimiser_keeps');
    expect(keeps).toBe(lines[0].split(',').indexOf('demand_source') + 1);
    expect(lines.slice(1).filter((l) => l.split(',')[keeps] === 'no').length).toBe(dropped.length);
    // summary.json carries the joint figures
    const sum = summaryObject(r) as any;
    expect(sum.plan.file).toBe('plan.json');
    expect(sum.plan.totals.net_pax_min_per_day).toBeCloseTo(plan.figures.totals.netPaxMinPerDay, 9);
    expect(sum.plan.fleet.length).toBeGreaterThan(0);
  });

  it.skipIf(!existsSync(MANHATTAN))(
    'on nyct-bus-manhattan.zip, whatif of the plan gives the plan figures',
    async () => {
      const feed = await readFeed(MANHATTAN, { date: 'auto' });
      const patterns = buildPatterns(feed, { date: feed.date ?? undefined });
      const r = runAudit(feed, patterns, { generatedAt: '2026-01-01T00:00:00Z' });
      const plan = r.plan!;
      expect(plan.stopsDropped).toBeGreaterThan(0);
      const w = evaluateScenario(feed, patterns, parseScenario(JSON.parse(JSON.stringify(plan.scenario))), {});
      expect(w.totals.netPaxMinPerDay).toBeCloseTo(plan.figures.totals.netPaxMinPerDay, 3);
      const lost = r.patterns.reduce((s, p) => s + p.paxMinLostPerDay, 0);
      expect(Math.abs(w.totals.netPaxMinPerDay + lost) / lost).toBeLessThan(0.01);
    },
    600_000,
  );
});
