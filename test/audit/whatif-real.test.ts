// A what-if on the real Manhattan bus feed: remove every close stop of the pattern with the most of them,
// and set the run time saved next to published consolidation results.
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { readFeed } from '../../src/gtfs/index.js';
import { buildPatterns } from '../../src/network/index.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { evaluateScenario, type ScenarioResult } from '../../src/audit/whatif.js';
import type { AuditResult } from '../../src/audit/types.js';

const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');
const BUS = join(FEEDS, 'nyct-bus-manhattan.zip');
const DATE = '2026-10-14';
const have = existsSync(BUS);
const PARAMS = { cruise_speed_mps: 11.176, stopping_model: 'always' }; // 25 mph, exact conversion
if (!have) console.warn(`skipping the real-feed what-if: ${BUS} not found (set STOPSPAN_FEEDS)`);

describe.skipIf(!have)('evaluateScenario on nyct-bus-manhattan.zip', () => {
  let audit: AuditResult;
  let r: ScenarioResult;
  let removedIds: string[];
  let runTimeS: number;
  beforeAll(async () => {
    const feed = await readFeed(BUS, { date: DATE });
    const patterns = buildPatterns(feed, { date: DATE });
    // With the default parameters no Manhattan stop is close (see runAudit-real.test.ts), so this uses the
    // regime of the HCM example instead: cruise at 25 mph and a bus that stops at every stop.
    audit = runAudit(feed, patterns, { params: PARAMS });
    const worst = [...audit.patterns].sort((a, b) => b.closeStops - a.closeStops || a.patternId.localeCompare(b.patternId))[0];
    runTimeS = worst.runTimeS;
    removedIds = audit.stops.filter((s) => s.patternId === worst.patternId && s.verdict === 'close').map((s) => s.stopId);
    r = evaluateScenario(feed, patterns, { remove: removedIds.map((stop) => ({ stop, routes: [worst.routeId] })) }, { params: PARAMS });
  }, 240_000);

  it('saves run time on the pattern, less than the full lost time of each stop removed', () => {
    expect(removedIds.length).toBeGreaterThan(0);
    const e = r.patterns.find((p) => p.removedStopIds.length === removedIds.length)!;
    expect(e).toBeDefined();
    const perStop = e.runTimeSavedPerTripS / removedIds.length;
    const share = e.runTimeSavedPerTripS / runTimeS;
    // El-Geneidy et al. 2006 (TRR 1971) found consolidation cut running time by nearly 6 %, and Portland's
    // Route 14 about 26 s per stop removed [C, via the issue]. The model's figure is far smaller (recorded
    // in the notes): at 25 mph the lost time is 14.2 s per stop and the model has no signal or queueing
    // delay that a stop adds in real traffic. Here the direction and the bound are checked: a positive
    // saving, at most the full lost time per stop, and taking out a run of adjacent close stops together
    // opens a gap above the walking policy.
    const p = audit.patterns.find((x) => x.patternId === e.patternId)!.lostTimePerStopS;
    expect(perStop).toBeGreaterThan(0);
    expect(perStop).toBeLessThanOrEqual(p + 1e-9);
    expect(share).toBeLessThan(0.06);
    expect(r.totals.walkAddedPaxMinPerDay).toBeGreaterThan(0);
    expect(e.largestGapAfterM).toBeGreaterThan(e.largestGapBeforeM);
  });
});
