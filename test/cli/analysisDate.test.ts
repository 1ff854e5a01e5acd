// One analysis-date rule for every command: on a hand-made Vellmoor feed where counting plain trips and
// counting frequency-expanded runs pick different days, the audit's reader and the loader of check and
// compare pick the same day, the one DESIGN.md section 3 describes (frequencies expanded).
import { afterAll, describe, expect, it } from 'vitest';
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT, runCli } from '../helpers/cli.js';
import { readFeed } from '../../src/gtfs/readFeed.js';
import { loadNetwork } from '../../src/network/loadNetwork.js';

const dir = mkdtempSync(join(tmpdir(), 'stopspan-date-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/**
 * The clean check fixture with two services in the week of 2026-10-12 (a Monday [C, ECMAScript Date]):
 * MON runs trips T1 and T2 on Mondays (2 plain trips), TUE runs T3 on Tuesdays, every 10 minutes from
 * 07:00 to 08:00 (6 runs by frequencies.txt [C, GTFS Schedule reference: start_time + k * headway_secs
 * before end_time]). Plain trips: Monday 2, Tuesday 1; runs: Monday 2, Tuesday 6 [D].
 */
function splitFeed(): string {
  const feed = join(dir, 'split');
  cpSync(join(ROOT, 'fixtures/check/clean'), feed, { recursive: true });
  writeFileSync(
    join(feed, 'calendar.txt'),
    'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nMON,1,0,0,0,0,0,0,20261012,20261018\nTUE,0,1,0,0,0,0,0,20261012,20261018\n',
  );
  writeFileSync(
    join(feed, 'trips.txt'),
    'route_id,service_id,trip_id,trip_headsign,direction_id,shape_id\nR1,MON,T1,Kanaalbrug,0,SH1\nR1,MON,T2,Kanaalbrug,0,SH1\nR1,TUE,T3,Kanaalbrug,0,SH1\n',
  );
  const times = readFileSync(join(feed, 'stop_times.txt'), 'utf8').trim().split('\n');
  const t1 = times.filter((l) => l.startsWith('T1,'));
  writeFileSync(join(feed, 'stop_times.txt'), [...times, ...t1.map((l) => l.replace(/^T1,/, 'T3,'))].join('\n') + '\n');
  writeFileSync(join(feed, 'frequencies.txt'), 'trip_id,start_time,end_time,headway_secs,exact_times\nT3,07:00:00,08:00:00,600,1\n');
  return feed;
}

describe('the default analysis date', () => {
  it('is the same for the audit and for check/compare: the weekday with the most runs, frequencies expanded', async () => {
    const feed = splitFeed();
    const audit = await readFeed(feed, { date: 'auto' });
    const loaded = await loadNetwork(feed);
    expect(audit.date).toBe('2026-10-13'); // Tuesday: 6 runs against Monday's 2 [D]
    expect(loaded.date).toBe(audit.date);
    expect(loaded.analysis.basis).toBe('busiest-weekday');
    expect(loaded.patterns.patterns[0].tripsPerDay).toBe(6);
    // compare's day-only read: the same day and reason, the patterns, and Tuesday's trip alone held
    const day = await loadNetwork(feed, { dayOnly: true });
    expect(day.analysis).toEqual(loaded.analysis);
    expect(day.patterns.patterns).toEqual(loaded.patterns.patterns);
    expect([...day.feed.trips.keys()]).toEqual(['T3']);
    expect(loaded.feed.trips.size).toBe(3);
    // and through the built command: compare's dates and the audit's summary.json agree
    const cmp = await runCli(['compare', feed, feed, '--no-audit', '--json']);
    expect(cmp.code).toBe(0);
    expect(JSON.parse(cmp.stdout).dates).toEqual({ old: '2026-10-13', new: '2026-10-13' });
    const out = join(dir, 'audit-out');
    const a = await runCli(['audit', feed, '--out', out, '--quiet']);
    expect(a.code).toBe(0);
    expect(JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')).date).toBe('2026-10-13');
  });
});

describe('a --date that is not a date', () => {
  it('is refused by every command with the same one line, naming the option once, before the feed is read', async () => {
    const feed = join(dir, 'no-such-feed.zip'); // never read: the date is checked first
    const runs = await Promise.all([
      runCli(['audit', feed, '--date', '2026-02-30', '--out', join(dir, 'bad-date')]),
      runCli(['whatif', feed, '--date', '2026-02-30', '--remove', 'S1']),
      runCli(['check', feed, '--date', '2026-02-30']),
      runCli(['compare', feed, feed, '--date', '2026-02-30']),
    ]);
    // 2026 is not a leap year, so 30 February does not exist [C, ECMAScript Date: Date.UTC(2026, 1, 30) rolls into March]
    expect(new Date(Date.UTC(2026, 1, 30)).getUTCMonth()).toBe(2);
    for (const r of runs) {
      expect(r.code).toBe(2);
      expect(r.stderr).toBe('error: invalid option --date: expected a date YYYY-MM-DD, got 2026-02-30\n');
    }
  });
});
