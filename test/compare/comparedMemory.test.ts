// What the compare command holds of the older feed while it reads and audits the newer one: the cut
// feed and patterns compare exactly as the whole ones do, hold no piece of the whole feed's stop_times
// or of its tables' decoded text, and the day-only read gives the patterns the whole read gives.
import { describe, expect, it } from 'vitest';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import { comparedPart, comparedPatterns, compareFeeds } from '../../src/compare/compare.js';
import { ownCopy } from '../../src/common/ownCopy.js';
import { loadNetwork } from '../../src/network/loadNetwork.js';
import { buildFeed, cleanSpec, street, type FeedSpec } from '../helpers/buildFeed.js';

const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');
const BUS = join(FEEDS, 'nyct-bus-manhattan.zip');

/** A full collection, as `node --expose-gc` offers it (the flag set here, for this test's process). */
function collect(): void {
  setFlagsFromString('--expose-gc');
  (runInNewContext('gc') as () => void)();
}

function heapUsedMB(): number {
  collect();
  return process.memoryUsage().heapUsed / 2 ** 20;
}

function twoRoutes(): FeedSpec {
  const spec = cleanSpec();
  const b = street(4, 300, 'B');
  spec.stops.push(...b);
  spec.routes = [{ id: 'R1' }, { id: 'R2' }];
  spec.trips.push({ id: 'T2', routeId: 'R2', times: b.map((s, k) => [s.id, 30000 + 60 * k, 30000 + 60 * k] as [string, number, number]) });
  return spec;
}

/** 2 000 ids of 40 characters cut from four texts of 2 MiB (one byte a character), each id passed through copy. */
function idsOf(copy: (s: string) => string): string[] {
  const ids: string[] = [];
  for (let k = 0; k < 4; k++) {
    // a fresh text each time, as a table's decoded chunks are
    const text = Array.from({ length: 2 ** 21 / 64 }, (_, i) => `${k}-${String(i).padStart(30, '0')},`.padEnd(64, 'x')).join('');
    for (let i = 0; i < 500; i++) ids.push(copy(text.slice(i * 64, i * 64 + 40)));
  }
  return ids;
}

/** Megabytes the ids hold once collected (a first run unmeasured, so code and caches are not counted). */
function heldMB(copy: (s: string) => string): number {
  idsOf(copy);
  const before = heapUsedMB();
  const ids = idsOf(copy);
  const mb = heapUsedMB() - before;
  expect(new Set(ids).size).toBe(2000);
  return mb;
}

describe('ownCopy', () => {
  it('keeps ids cut from a large text without the text: 8 MiB of text, 2 000 ids of 40 characters', () => {
    // the pieces as cut keep every text (4 x 2 MiB); the copies about 2 000 x 70 bytes [D]
    expect(heldMB((s) => s)).toBeGreaterThan(6);
    expect(heldMB(ownCopy)).toBeLessThan(1);
    expect(ownCopy('nyct-bus-manhattan3:OH_D6-Weekday-SDon-110500_M101_111')).toBe(
      'nyct-bus-manhattan3:OH_D6-Weekday-SDon-110500_M101_111',
    );
    expect(ownCopy('T1')).toBe('T1');
  });
});

describe('comparedPatterns with comparedPart', () => {
  it('compare as the whole older feed does, with no path or per-stop times held', () => {
    const a = buildFeed(twoRoutes());
    const spec = twoRoutes();
    // R1 gains a trip later in the day, R2's trip leaves a minute later, with its stops the same
    spec.trips.push({
      ...spec.trips[0],
      id: 'T1b',
      times: spec.trips[0].times.map(([s, arr, dep]) => [s, arr + 3600, dep + 3600] as [string, number, number]),
    });
    spec.trips[1].times = spec.trips[1].times.map(([s, arr, dep]) => [s, arr + 60, dep + 60] as [string, number, number]);
    const b = buildFeed(spec);
    const whole = compareFeeds(a.feed, b.feed, a.patterns, b.patterns);
    const patterns = comparedPatterns(a.patterns);
    const part = comparedPart(a.feed, patterns);
    expect(compareFeeds(part, b.feed, patterns, b.patterns)).toEqual(whole);
    expect(whole.trips.byPattern.length).toBeGreaterThan(0);
    expect(patterns.patterns.every((p) => p.path.length === 0 && p.gapRunTimeS.length === 0 && p.scheduledDwellS.length === 0)).toBe(true);
    expect(patterns.patterns.map((p) => p.tripIds)).toEqual(a.patterns.patterns.map((p) => p.tripIds));
    expect(patterns.routesAtStop.size).toBe(0);
  });
});

describe.skipIf(!existsSync(BUS))('the older feed as compare holds it, on the Manhattan bus feed', () => {
  it('reads the day alone with the same date and patterns, and the cut part lets the whole feed go', async () => {
    const all = await loadNetwork(BUS);
    // the feeds' README: 37 872 trips in trips.txt [real feed fact]
    expect(all.feed.trips.size).toBe(37872);
    // a route's trips halved in the newer version
    const halved = new Set(
      all.patterns.patterns
        .filter((p) => p.routeId === all.patterns.patterns[0].routeId)
        .flatMap((p) => p.tripIds.filter((_, k) => k % 2 === 1)),
    );
    const newPatterns = {
      ...all.patterns,
      patterns: all.patterns.patterns.map((p) => ({
        ...p,
        tripIds: p.tripIds.filter((t) => !halved.has(t)),
        tripsPerDay: p.tripsPerDay - p.tripIds.filter((t) => halved.has(t)).length,
      })),
    };
    const whole = compareFeeds(all.feed, all.feed, all.patterns, newPatterns);
    expect(whole.trips.byRoute.length).toBe(1);

    // read and cut in a function of its own, as the command does, so nothing but its answer stays
    const older = async () => {
      const day = await loadNetwork(BUS, { dayOnly: true });
      const patterns = comparedPatterns(day.patterns);
      return {
        day: { date: day.date, analysis: day.analysis, patterns: day.patterns, trips: day.feed.trips.size },
        part: comparedPart(day.feed, patterns),
        patterns,
        store: new WeakRef(day.feed.stopTimes),
      };
    };
    const { day, part, patterns, store } = await older();
    expect(day.date).toBe(all.date);
    expect(day.analysis).toEqual(all.analysis);
    expect(day.patterns.patterns).toEqual(all.patterns.patterns);
    // the weekday's trips alone: fewer than every day's, and at least the patterns' trips
    const patternTrips = day.patterns.patterns.reduce((n, p) => n + p.tripIds.length, 0);
    expect(day.trips).toBeLessThan(all.feed.trips.size);
    expect(day.trips).toBeGreaterThanOrEqual(patternTrips);
    // the cut compares as the whole does
    expect(compareFeeds(part, all.feed, patterns, newPatterns)).toEqual(whole);
    expect(part.stopTimes.size).toBe(patternTrips);
    // and refers to nothing of the day's stop_times store: with the loaded feed gone, so is the store
    await new Promise((r) => setTimeout(r, 10));
    collect();
    expect(store.deref()).toBeUndefined();
  }, 120_000);
});
