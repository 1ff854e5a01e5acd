// The one loader of a day's network (src/network/loadNetwork.ts) that audit and whatif share: the date
// asked for, else the busiest Monday-Friday date, the patterns built on it, a day without service refused.
// Invented city of Vellmoor (the demo feed).
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadDayNetwork } from '../../src/network/loadNetwork.js';
import { readFeed } from '../../src/gtfs/readFeed.js';
import { defaultAnalysisDate } from '../../src/gtfs/calendar.js';
import { ROOT } from '../helpers/cli.js';
import { rejected } from '../helpers/errors.js';

const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');

describe('loadDayNetwork', () => {
  it('reads the busiest weekday by default and builds every pattern running that day', async () => {
    const { feed, patterns } = await loadDayNetwork(DEMO);
    const all = await readFeed(DEMO, { date: 'all' });
    const runs = new Map<string, number>();
    for (const t of all.trips.values()) runs.set(t.serviceId, (runs.get(t.serviceId) ?? 0) + 1);
    // the same day the calendar rule picks from the whole feed (no frequencies in the demo)
    expect(feed.date).toBe(defaultAnalysisDate(all, runs));
    expect(patterns.date).toBe(feed.date);
    expect(new Date(`${feed.date}T12:00:00Z`).getUTCDay()).toBeGreaterThanOrEqual(1);
    expect(new Date(`${feed.date}T12:00:00Z`).getUTCDay()).toBeLessThanOrEqual(5);
    // every trip kept is in exactly one pattern
    const inPatterns = patterns.patterns.reduce((n, p) => n + p.tripIds.length, 0);
    expect(inPatterns).toBe(feed.trips.size);
  });

  it('reads the date asked for, and refuses one without service in one coded error', async () => {
    const { feed } = await loadDayNetwork(DEMO);
    const next = new Date(Date.parse(`${feed.date}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10); // a weekday or Saturday
    const asked = await loadDayNetwork(DEMO, { date: next });
    expect(asked.feed.date).toBe(next);
    expect(asked.patterns.date).toBe(next);
    expect(asked.patterns.patterns.length).toBeGreaterThan(0);
    const e = await rejected(loadDayNetwork(DEMO, { date: '2030-01-01' }));
    expect(e.code).toBe('empty-feed');
  });
});
