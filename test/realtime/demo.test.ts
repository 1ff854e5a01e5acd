// The demo archive (fixtures/demo/realtime.zip, written by scripts/make-demo-realtime.mjs) read against
// the demo feed through the project's own reader and pattern builder: the recovered values against the
// values the generator used (fixtures/demo/realtime-truth.json).

import { readFileSync } from 'node:fs';
import { describe, expect, it, beforeAll } from 'vitest';
import { readFeed } from '../../src/gtfs/index.js';
import { buildPatterns } from '../../src/network/index.js';
import { observeArchive, type ObservedData } from '../../src/realtime/index.js';
import type { PatternSet } from '../../src/network/types.js';
import type { Feed } from '../../src/gtfs/types.js';

interface RouteTruth {
  cruiseSpeedMps: number;
  dwellS: number;
  stopLossS: number;
}
const truth: { routes: Record<string, RouteTruth>; stopShare: Record<string, { poissonP: number }> } = JSON.parse(
  readFileSync('fixtures/demo/realtime-truth.json', 'utf8'),
);
let data: ObservedData;
let patterns: PatternSet;
let feed: Feed;

beforeAll(async () => {
  feed = await readFeed('fixtures/demo/demo-feed.zip', { date: '2026-11-04' });
  patterns = buildPatterns(feed);
  data = await observeArchive('fixtures/demo/realtime.zip', feed, patterns);
}, 120_000);

// R10's shape_dist_traveled is in kilometres; the pattern builder currently reports its distances
// unconverted (lengthM about 15.9), so speeds over it come out a thousand times too low. Kept apart
// until that is fixed in src/network.
const KM_ROUTE = 'R10';

describe('observeArchive on the demo archive', () => {
  it('reads every snapshot but the DIFFERENTIAL one and matches every trip instance', () => {
    // 07:00-10:00 every 30 s: 361 polls, a TripUpdates and a VehiclePositions file each
    expect(data.snapshotsRead).toBe(722);
    expect(data.snapshotsSkipped).toBe(1);
    expect(data.tripsUnmatched).toBe(0);
    expect(data.tripsMatched).toBeGreaterThan(200);
    expect(data.warnings.find((w) => w.code === 'realtime-vehicle-without-trip')?.count).toBeGreaterThan(0);
  });

  it("recovers each route's dwell within 0.5 s, cruise speed within 3 % and stop loss within 1.5 s", () => {
    // the generator's values are in realtime-truth.json; the stop loss is V/(2a) + V/(2d) + t_reentry [D]
    let checked = 0;
    for (const p of patterns.patterns) {
      if (p.routeId === KM_ROUTE) continue;
      const o = data.byPattern.get(p.id)!;
      const r = truth.routes[p.routeId];
      expect(Math.abs(o.meanDwellS! - r.dwellS)).toBeLessThan(0.5);
      expect(Math.abs(o.cruiseSpeedMps! / r.cruiseSpeedMps - 1)).toBeLessThan(0.03);
      expect(Math.abs(o.stopLossS! - r.stopLossS)).toBeLessThan(1.5);
      checked++;
    }
    expect(checked).toBeGreaterThan(10);
  });

  it('recovers the cruise speed of the route whose shape distances are in kilometres', () => {
    const p = patterns.patterns.find((x) => x.routeId === KM_ROUTE)!;
    expect(Math.abs(data.byPattern.get(p.id)!.cruiseSpeedMps! / truth.routes[KM_ROUTE].cruiseSpeedMps - 1)).toBeLessThan(0.03);
  });

  it('stops as often as the Poisson chance says, and as often as Levinson saw local buses stop in the peak', () => {
    // expected share 1 - exp(-lambda) per stop [M, Poisson stopping, standard in the stop-spacing literature]
    let obsSum = 0;
    let expSum = 0;
    let n = 0;
    for (const p of patterns.patterns) {
      const o = data.byPattern.get(p.id)!;
      for (let i = 1; i < p.stopIdx.length - 1; i++) {
        const share = o.stopShare[i];
        const t = truth.stopShare[feed.stops[p.stopIdx[i]].id];
        if (share === null || !t || !p.passengerStop[i]) continue;
        obsSum += share * o.stopsObserved![i];
        expSum += t.poissonP * o.stopsObserved![i];
        n += o.stopsObserved![i];
      }
    }
    const observed = obsSum / n;
    const expected = expSum / n;
    // binomial standard error of the pooled share, three of them
    expect(Math.abs(observed - expected)).toBeLessThan(3 * Math.sqrt((expected * (1 - expected)) / n));
    // Levinson 1983, TRR 915: local buses stopped at 68-78 % of stops in the peak [C]
    expect(observed).toBeGreaterThan(0.68);
    expect(observed).toBeLessThan(0.78);
  });
});

describe('make-demo-realtime.mjs', () => {
  it('writes the same bytes on every run', async () => {
    const { execFileSync } = await import('node:child_process');
    const { mkdtempSync, rmSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const { join } = await import('node:path');
    const out = mkdtempSync(join(tmpdir(), 'stopspan-demo-rt-'));
    try {
      execFileSync(process.execPath, ['scripts/make-demo-realtime.mjs', '--out', out]);
      for (const f of ['realtime.zip', 'realtime-truth.json']) {
        expect(readFileSync(join(out, f)).equals(readFileSync(join('fixtures/demo', f)))).toBe(true);
      }
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  }, 120_000);
});
