// The audit on the real Manhattan bus feed with default parameters: the feed's documented facts, the
// model's invariants, and the published comparison of optimal against existing spacing.
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { readFeed } from '../../src/gtfs/index.js';
import { buildPatterns } from '../../src/network/index.js';
import { runAudit } from '../../src/audit/runAudit.js';
import type { AuditResult } from '../../src/audit/types.js';

const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');
const BUS = join(FEEDS, 'nyct-bus-manhattan.zip');
const DATE = '2026-10-14'; // the date of the feeds' README facts, a Wednesday
const have = existsSync(BUS);
if (!have) console.warn(`skipping the real-feed audit: ${BUS} not found (set STOPSPAN_FEEDS)`);

describe.skipIf(!have)('runAudit on nyct-bus-manhattan.zip', () => {
  let r: AuditResult;
  let feedRef: Awaited<ReturnType<typeof readFeed>>;
  let patternsRef: ReturnType<typeof buildPatterns>;
  beforeAll(async () => {
    const feed = await readFeed(BUS, { date: DATE });
    const patterns = buildPatterns(feed, { date: DATE });
    feedRef = feed;
    patternsRef = patterns;
    r = runAudit(feed, patterns, { generatedAt: '2026-10-14T00:00:00Z' });
  }, 240_000);

  it('sees the patterns and the median gap the feeds README documents', () => {
    // feeds README (independent script, 2026-10-14): 151 patterns, 8 575 trips, median gap along the shape 222.3 m
    expect(r.headline.patterns).toBe(151);
    expect(r.headline.trips).toBe(8575);
    expect(Math.abs(r.headline.medianGapM / 222.3 - 1)).toBeLessThan(0.01);
  });

  it('gives every pattern a finite optimum inside its band, and a non-negative loss', () => {
    for (const p of r.patterns) {
      expect(p.optimalSpacingM).toBeGreaterThan(0);
      expect(p.bandLowM).toBeLessThan(p.optimalSpacingM);
      expect(p.bandHighM).toBeGreaterThan(p.optimalSpacingM);
      expect(p.paxMinLostPerDay).toBeGreaterThanOrEqual(0);
      expect(p.optimalStopCount).toBeLessThanOrEqual(p.stopCount);
      expect(p.demandSource).toBe('assumed');
    }
    expect(r.stops.every((s) => s.demandSource === 'assumed')).toBe(true);
  });

  it('moves the optimum the way the walk weight says: lighter walking, longer spacing', () => {
    // [D] s* is proportional to 1/sqrt(w)
    const [w15, w25] = r.sensitivity;
    expect(w15.meanOptimalSpacingM).toBeGreaterThan(r.headline.meanOptimalSpacingM);
    expect(w25.meanOptimalSpacingM).toBeLessThan(r.headline.meanOptimalSpacingM);
  });

  // Furth & Rahbee 2000 (TRR 1731) and Li & Bertini 2008 found optimal spacing above the existing one [C,
  // via design notes], on observed demand. On assumed demand the answer rests on the mean trip: with the
  // city-bus 2 miles the mean optimum came out 210.1 m against a median gap of 222.4 m (2026-12-03), inside
  // the near-optimal band of today's spacing; with the national motor-bus mean (3.8 mi, 6.1 km) riders ride
  // further, more of them are delayed at each stop, and the optimum passes today's gap, the published
  // direction. [D] s* grows with the load on board, so longer trips must give a longer optimum.
  it("puts today's median gap inside the default optimum's 5 % band, and longer trips past it (published direction)", () => {
    const ratio = r.headline.medianGapM / r.headline.meanOptimalSpacingM;
    // [D] x + 1/x = 2(1 + 0.05): roots 0.72984 and 1.37016
    expect(ratio).toBeGreaterThan(0.72984);
    expect(ratio).toBeLessThan(1.37016);
    const long = runAudit(feedRef, patternsRef, { params: { mean_trip_length_m: 6100 }, generatedAt: '2026-10-14T00:00:00Z' });
    expect(long.headline.meanOptimalSpacingM).toBeGreaterThan(r.headline.meanOptimalSpacingM);
    expect(long.headline.meanOptimalSpacingM).toBeGreaterThan(long.headline.medianGapM);
  }, 240_000);

  it('reads the congested schedule as traffic delay at the typical bus speed, and stops at every stop on assumed demand', () => {
    for (const p of r.patterns) {
      expect(p.stoppingModel).toBe('always');
      expect(p.cruiseSpeedMps).toBeGreaterThanOrEqual(11.17);
      expect(p.trafficDelayS).not.toBeNull();
      expect(p.trafficDelayS!).toBeGreaterThanOrEqual(0);
      expect(p.trafficDelayS!).toBeLessThan(p.runTimeS);
    }
    // Manhattan buses are scheduled far below street speed: most patterns hold traffic delay
    expect(r.patterns.filter((p) => p.trafficDelayS! > 0).length).toBeGreaterThan(r.patterns.length / 2);
  });

  it('models no pattern cruising above the plausible bus speed from its schedule alone', () => {
    // a schedule no plausible speed explains takes the typical 25 mph, never the 25 m/s ceiling
    for (const p of r.patterns) expect(p.cruiseSpeedMps).toBeLessThanOrEqual(25);
    const tooFast = r.warnings.find((w) => w.code === 'schedule-too-fast')?.count ?? 0;
    expect(r.patterns.filter((p) => p.cruiseSpeedMps > 11.18).length).toBe(0);
    expect(tooFast).toBe(0); // measured: none of the 151 patterns on 2026-10-14
  });

  it('ranks candidates and never removes a fixed stop', () => {
    const fixed = new Set(r.stops.filter((s) => s.verdict === 'fixed').map((s) => s.stopId));
    for (let i = 1; i < r.candidates.length; i++)
      expect(r.candidates[i].netPaxMinPerDay).toBeGreaterThanOrEqual(r.candidates[i - 1].netPaxMinPerDay);
    for (const c of r.candidates) if (c.action === 'remove') expect(fixed.has(c.stopId)).toBe(false);
  });
});
