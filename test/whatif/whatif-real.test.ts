// A what-if on the real Manhattan bus feed: remove every close stop of the pattern with the most of them,
// and set the run time saved next to published consolidation results.
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { readFeed } from '../../src/gtfs/index.js';
import { buildPatterns } from '../../src/network/index.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { evaluateScenario, type ScenarioResult } from '../../src/whatif/whatif.js';
import type { AuditResult } from '../../src/audit/types.js';
import type { ModelParams } from '../../src/model/params.js';

const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');
const BUS = join(FEEDS, 'nyct-bus-manhattan.zip');
const DATE = '2026-10-14';
const have = existsSync(BUS);
const PARAMS: Partial<ModelParams> = { cruise_speed_mps: 11.176, stopping_model: 'always' }; // 25 mph, exact conversion
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
    const p = audit.patterns.find((x) => x.patternId === e.patternId)!.lostTimePerStopS;
    // The figure for the notes, printed with the run.
    console.info(
      `what-if on ${e.patternId} (${DATE}, cruise 25 mph, always stopping): ${removedIds.length} close stops removed, ` +
        `run time saved ${e.runTimeSavedPerTripS.toFixed(1)} s per trip = ${perStop.toFixed(1)} s per stop removed = ` +
        `${(share * 100).toFixed(2)} % of the scheduled ${Math.round(runTimeS)} s; lost time per stop ${p.toFixed(1)} s; ` +
        `net ${Math.round(e.netPaxMinPerDay)} pax-min/day, ${e.vehicleHoursPerDay.toFixed(2)} vehicle-hours/day`,
    );
    // Published consolidation results: El-Geneidy et al. 2006 (TRR 1971), running times improved by nearly
    // 6 % [C]; Portland Route 14, about 26 s saved per stop removed [C, USDOT ITS benefit database]. Measured
    // here (M15:1:1, 17 close stops): about 16 s per stop removed and about 5.4 % of the run time. It need
    // not match, and differs for known reasons: the model saves exactly the lost time of one stop (doors,
    // braking and accelerating from cruise speed, re-entry: about 16 s at 25 mph) because the boarding time
    // moves to the neighbours with the riders; a stop removed in real traffic also takes away signal and
    // queueing delay, the slow pull to the kerb and part of the dwell spread, which Portland's 26 s includes.
    // The per cent is near 6 % partly by coincidence: it depends on how many stops are taken out of how long
    // a route (here 17 on one long avenue pattern under a regime where the bus stops everywhere), and the
    // Portland study removed a smaller share. So only what the model must satisfy is asserted: a positive
    // saving, at most the full lost time per stop (with rounding room), a share of the run time between 0
    // and 1, riders who walk farther and ride faster, and a gap that opens.
    expect(perStop).toBeGreaterThan(0);
    expect(perStop).toBeLessThanOrEqual(p + 1e-6);
    expect(share).toBeGreaterThan(0);
    expect(share).toBeLessThan(1);
    expect(e.ridersAffectedPerDay).toBeGreaterThan(0);
    expect(r.totals.walkAddedPaxMinPerDay).toBeGreaterThan(0);
    expect(e.rideSavedPaxMinPerDay).toBeGreaterThan(0);
    expect(e.largestGapAfterM).toBeGreaterThan(e.largestGapBeforeM);
    expect(r.cautions.length).toBeGreaterThan(0);
  });
});
