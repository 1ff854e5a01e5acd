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
  beforeAll(async () => {
    const feed = await readFeed(BUS, { date: DATE });
    const patterns = buildPatterns(feed, { date: DATE });
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
  // via design notes]. With the default parameters this model does NOT reproduce that on Manhattan: the
  // schedule implies cruise speeds at or below the 5 m/s bus floor, so the lost time per stop is only
  // about 9 s; with assumed demand of 3 boardings per trip-km the Poisson model has buses skip many stops,
  // and the mean trip is about 2.4 km, so the mean optimum comes out near 120 m against a 222 m median
  // gap. Marked as an expected failure so that the disagreement stays visible: if a change of defaults
  // makes the model agree with the publications, this test fails and must be turned into a plain check.
  it.fails('finds the mean optimal spacing longer than the median gap today (published finding)', () => {
    expect(r.headline.meanOptimalSpacingM).toBeGreaterThan(r.headline.medianGapM);
  });

  it('ranks candidates and never removes a fixed stop', () => {
    const fixed = new Set(r.stops.filter((s) => s.verdict === 'fixed').map((s) => s.stopId));
    for (let i = 1; i < r.candidates.length; i++) expect(r.candidates[i].netPaxMinPerDay).toBeGreaterThanOrEqual(r.candidates[i - 1].netPaxMinPerDay);
    for (const c of r.candidates) if (c.action === 'remove') expect(fixed.has(c.stopId)).toBe(false);
  });
});
