// Checking a feed read with holdDay (only one day's trips held in stop_times, every trip's rows shown to a
// TripFindings as they are read) must give the report of the whole read, whatever the order of the rows in
// stop_times.txt: examples in trips.txt order, exact counts, and the held trips only the day's.

import { readFileSync, writeFileSync, cpSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { checkFeed, TripFindings } from '../../src/check/check.js';
import { loadNetwork } from '../../src/network/loadNetwork.js';
import { readFeed } from '../../src/gtfs/index.js';
import { buildPatterns } from '../../src/network/index.js';
import { isStopspanError } from '../../src/common/errors.js';
import { tempDir } from '../helpers/tempDir.js';

const CLEAN = resolve(import.meta.dirname, '../../fixtures/check/clean');
const TODAY = '2026-10-14'; // a Wednesday
const SATURDAY = '2026-10-17';

const SERVICES = ['WK', 'SA', 'SU'];
const CALENDAR = [
  'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date',
  'WK,1,1,1,1,1,0,0,20260101,20271231',
  'SA,0,0,0,0,0,1,0,20260101,20271231',
  'SU,0,0,0,0,0,0,1,20260101,20271231',
].join('\n');

type Order = 'trips' | 'reversed' | 'scattered';

/**
 * The clean feed with 24 trips on three services, faults spread over every day: no shape (every third
 * trip), shape_dist_traveled falling (every fourth), time running backwards (every fifth), no time at the last
 * stop (trip 7), and one trip without rows (trip 11). stop_times.txt lists the trips in trips.txt
 * order, reversed, or with their rows interleaved (not grouped by trip).
 */
function makeFeed(order: Order): string {
  const dir = tempDir('stopspan-held-');
  cpSync(CLEAN, dir, { recursive: true });
  const route = readFileSync(join(CLEAN, 'trips.txt'), 'utf8').split('\n')[1].split(',')[0];
  const trips = ['route_id,service_id,trip_id,trip_headsign,direction_id,shape_id'];
  const rowsOf: string[][] = [];
  for (let i = 0; i < 24; i++) {
    trips.push(`${route},${SERVICES[i % 3]},T${i},Kanaalbrug,0,${i % 3 === 0 ? '' : 'SH1'}`);
    const rows: string[] = [];
    for (let s = 1; s <= 5; s++) {
      let t = 8 * 3600 + i * 600 + (s - 1) * 60;
      if (i % 5 === 0 && s === 4) t -= 150; // time runs backwards at stop 4
      const dist = i % 4 === 0 && s === 3 ? 100 : (s - 1) * 400; // distance falls at stop 3
      const clock = `${String(Math.floor(t / 3600)).padStart(2, '0')}:${String(Math.floor(t / 60) % 60).padStart(2, '0')}:${String(t % 60).padStart(2, '0')}`;
      const time = i === 7 && s === 5 ? '' : clock;
      rows.push(`T${i},${time},${time},S${s},${s},${dist}`);
    }
    if (i !== 11) rowsOf.push(rows);
  }
  let rows: string[];
  if (order === 'trips') rows = rowsOf.flat();
  else if (order === 'reversed') rows = rowsOf.reverse().flat();
  else rows = [0, 1, 2, 3, 4].flatMap((s) => rowsOf.map((r) => r[s]));
  writeFileSync(join(dir, 'trips.txt'), trips.join('\n') + '\n');
  writeFileSync(
    join(dir, 'stop_times.txt'),
    ['trip_id,arrival_time,departure_time,stop_id,stop_sequence,shape_dist_traveled', ...rows].join('\n') + '\n',
  );
  writeFileSync(join(dir, 'calendar.txt'), CALENDAR + '\n');
  return dir;
}

async function wholeCheck(dir: string, date: string, maxExamples: number) {
  const feed = await readFeed(dir, { date: 'all' });
  return checkFeed(feed, buildPatterns(feed, { date }), { today: TODAY, maxExamples });
}

async function heldCheck(dir: string, date: string, maxExamples: number) {
  const found = new TripFindings(maxExamples);
  const feed = await readFeed(dir, { date: 'all', holdDay: date, tripRows: found });
  const report = checkFeed(feed, buildPatterns(feed, { date }), { today: TODAY, maxExamples, tripFindings: found });
  return { feed, report };
}

describe('a check of a feed held for one day', () => {
  for (const order of ['trips', 'reversed', 'scattered'] as Order[]) {
    it(`reports as the whole read does, stop_times in ${order} order`, async () => {
      const dir = makeFeed(order);
      for (const date of [TODAY, SATURDAY]) {
        for (const maxExamples of [0, 2, 5, 50]) {
          const whole = await wholeCheck(dir, date, maxExamples);
          const { report } = await heldCheck(dir, date, maxExamples);
          expect(report).toEqual(whole);
        }
      }
      const whole = await wholeCheck(dir, SATURDAY, 2);
      // the faults are there, on trips of every day, more than the examples shown
      expect(whole.counts['pathless-trip']).toBe(8);
      expect(whole.counts['time-backtrack']).toBe(5);
      expect(whole.findings.find((f) => f.code === 'pathless-trip')!.examples.map((e) => e.ids.trip_id)).toEqual(['T0', 'T3']);
      expect(whole.findings.find((f) => f.code === 'time-backtrack')!.examples.map((e) => e.ids.trip_id)).toEqual(['T0', 'T5']);
    });
  }

  it("holds only the day's trips, and lists every trip with rows", async () => {
    const { feed } = await heldCheck(makeFeed('trips'), SATURDAY, 5);
    expect(feed.held).toBe(SATURDAY);
    expect([...feed.stopTimes.keys()]).toEqual(['T1', 'T4', 'T7', 'T10', 'T13', 'T16', 'T19', 'T22']);
    expect(feed.trips.size).toBe(23);
    expect(feed.warnings.find((w) => w.code === 'trip-without-stop-times')?.count).toBe(1);
    expect(feed.warnings.find((w) => w.code === 'trip-end-without-time')?.count).toBe(1);
    // the patterns of another day cannot be built from it, nor its trips checked without their findings
    expect(() => buildPatterns(feed, { date: TODAY })).toThrow(/held for \(2026-10-17\)/);
    expect(() => checkFeed(feed, buildPatterns(feed, { date: SATURDAY }), { today: TODAY })).toThrow(/holds the trips of 2026-10-17/);
  });

  it('holds every trip when stop_times.txt is not grouped by trip', async () => {
    const { feed } = await heldCheck(makeFeed('scattered'), SATURDAY, 5);
    expect(feed.held).toBeUndefined();
    expect(feed.stopTimes.size).toBe(23);
    expect(feed.warnings.filter((w) => w.code === 'stop-times-not-grouped').length).toBe(1);
  });

  it('gives the same warnings as the whole read', async () => {
    for (const order of ['trips', 'scattered'] as Order[]) {
      const dir = makeFeed(order);
      const whole = await readFeed(dir, { date: 'all' });
      const { feed } = await heldCheck(dir, SATURDAY, 5);
      expect(feed.warnings).toEqual(whole.warnings);
    }
  });
});

describe('loadNetwork with tripRows', () => {
  async function both(dir: string, options: { date?: string; today?: string }) {
    const found = new TripFindings(3);
    const held = await loadNetwork(dir, { ...options, tripRows: found });
    const whole = await loadNetwork(dir, options);
    const opts = { today: TODAY, maxExamples: 3, analysis: whole.analysis };
    expect(held.analysis).toEqual(whole.analysis);
    expect(checkFeed(held.feed, held.patterns, { ...opts, tripFindings: found })).toEqual(checkFeed(whole.feed, whole.patterns, opts));
    return held;
  }

  it('holds the day the rule picks, and checks as the whole read does', async () => {
    const dir = makeFeed('reversed');
    expect((await both(dir, { today: TODAY })).feed.held).toBe(TODAY);
    expect((await both(dir, { today: TODAY, date: SATURDAY })).feed.held).toBe(SATURDAY);
    expect((await both(dir, {})).feed.held).toBe('2026-01-01');
    expect((await both(makeFeed('scattered'), { today: TODAY })).feed.held).toBeUndefined();
  });

  it('reads again holding every trip when the trips with stop_times pick another day', async () => {
    // Mondays (SU) have more trips in trips.txt, Tuesdays (SA) more with stop_times
    const dir = makeFeed('trips');
    const calendar = [
      'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date',
      'WK,0,0,0,0,0,0,1,20260101,20271231',
      'SA,0,1,0,0,0,0,0,20260101,20271231',
      'SU,1,0,0,0,0,0,0,20260101,20271231',
    ];
    writeFileSync(join(dir, 'calendar.txt'), calendar.join('\n') + '\n');
    const trips = readFileSync(join(dir, 'trips.txt'), 'utf8').trimEnd().split('\n');
    for (let i = 0; i < 4; i++) trips.push(trips[3].replace('T2,', `X${i},`));
    writeFileSync(join(dir, 'trips.txt'), trips.join('\n') + '\n');
    const held = await both(dir, {});
    expect(held.feed.held).toBeUndefined();
    expect(held.analysis.date).toBe('2026-01-06');
  });

  it('fails as the whole read does when nothing runs on --date', async () => {
    const dir = makeFeed('trips');
    const e = await loadNetwork(dir, { date: '2025-01-01', tripRows: new TripFindings() }).catch((x: unknown) => x);
    expect(isStopspanError(e) && e.code).toBe('empty-feed');
  });
});
