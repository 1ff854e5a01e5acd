// readFeed on the hand-written Vellmoor fixture (each GTFS Schedule rule it exercises is cited beside its
// check), on damaged copies of it (each error pins code, file, line, column and value), and on the real
// feeds against the facts their README gives.

import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { ProgressEvent } from '../../src/common/progress.js';
import { MAX_TRIPS, readFeed, SHAPE_CAPS } from '../../src/gtfs/readFeed.js';
import { openFeed } from '../../src/gtfs/archive.js';
import { parse as parseStream } from 'csv-parse';
import type { Feed } from '../../src/gtfs/types.js';
import { BASIC, cleanupCopies, editTable, feedCopy, FIXTURES, zipFolder } from './feedCopy.js';
import { rejected } from '../helpers/errors.js';

afterAll(cleanupCopies);

const stopIds = (feed: Feed, tripId: string) => [...feed.stopTimes.get(tripId)!.stopIdx].map((i) => feed.stops[i].id);
const warning = (feed: Feed, code: string) => feed.warnings.find((w) => w.code === code);

describe('readFeed on the Vellmoor fixture', () => {
  it('picks the weekday with the most trips, frequencies expanded', async () => {
    const feed = await readFeed(BASIC);
    // WK weekdays: T1, T2 and TF (6 + 2 runs) = 10 runs; 2026-09-16 adds EXTRA's T3 = 11 [D, by hand]
    expect(feed.date).toBe('2026-09-16');
    expect([...feed.trips.keys()].sort()).toEqual(['T1', 'T2', 'T3', 'TF']);
    expect([...feed.stopTimes.keys()].sort()).toEqual(['T1', 'T2', 'T3', 'TF']);
  });

  it('sorts stop_times by stop_sequence numerically, which need not be consecutive', async () => {
    // [C, GTFS Schedule reference, stop_times.txt stop_sequence: values increase along the trip, need not be consecutive]
    const feed = await readFeed(BASIC);
    expect(stopIds(feed, 'T1')).toEqual(['S1', 'S2', 'S3', 'S4', 'S5']);
    const t1 = feed.stopTimes.get('T1')!;
    expect([...t1.seq]).toEqual([1, 5, 7, 10, 12]);
    expect([...t1.arrS]).toEqual([8 * 3600, 8 * 3600 + 120, -1, 8 * 3600 + 360, 8 * 3600 + 540]);
    expect([...t1.depS]).toEqual([8 * 3600, 8 * 3600 + 130, -1, 8 * 3600 + 390, 8 * 3600 + 540]);
    expect([...t1.shapeDist]).toEqual([0, 400.25, 800, 1200.5, 1500]);
    // [C, GTFS Schedule reference, timepoint: 0 approximate, 1 exact]
    expect([...t1.timepoint]).toEqual([1, 1, 0, 1, 1]);
    // [C, GTFS Schedule reference: pickup_type 1 and drop_off_type 1 = no pickup and no drop-off]
    expect([...t1.noService]).toEqual([0, 0, 0, 0, 1]);
  });

  it('reads times past 24:00:00 and single-digit hours', async () => {
    // [C, GTFS Schedule reference, Time: "HH:MM:SS ... can be greater than 24:00:00 for trips past midnight"; H:MM:SS accepted]
    const feed = await readFeed(BASIC);
    const t2 = feed.stopTimes.get('T2')!;
    expect(stopIds(feed, 'T2')).toEqual(['S4', 'S3', 'S1']);
    expect([...t2.arrS]).toEqual([24 * 3600 + 600, 24 * 3600 + 2400, 25 * 3600 + 330]);
    expect([...t2.depS]).toEqual([24 * 3600 + 600, 24 * 3600 + 2460, 25 * 3600 + 330]);
    // timepoint left blank with times given counts as exact [C, GTFS Schedule reference, timepoint]
    expect([...t2.timepoint]).toEqual([1, 1, 1]);
    expect(feed.stopTimes.get('T3')!.arrS[0]).toBe(9 * 3600);
  });

  it('keeps only the shapes the kept trips use, sorted by shape_pt_sequence', async () => {
    const feed = await readFeed(BASIC);
    expect([...feed.shapes.keys()]).toEqual(['SH1']);
    const sh = feed.shapes.get('SH1')!;
    expect([...sh.lat]).toEqual([52.5001, 52.503, 52.506, 52.509, 52.51]);
    expect([...sh.dist]).toEqual([0, 400.25, 800, 1200.5, 1500]);
  });

  it('reads stops, trimming padded coordinates and counting them', async () => {
    const feed = await readFeed(BASIC);
    const s1 = feed.stops[feed.stopIndex.get('S1')!];
    expect(s1).toEqual({
      id: 'S1',
      code: '101',
      name: 'Harbour Station Bay A',
      lat: 52.5001,
      lon: 13.4001,
      locationType: 0,
      parentStation: 'ST1',
    });
    // [C, GTFS Schedule reference, location_type: empty means 0, a stop or platform]
    expect(feed.stops[feed.stopIndex.get('S2')!]).toMatchObject({ name: 'Quay Street, North', locationType: 0 });
    expect(feed.stops[feed.stopIndex.get('ST1')!].locationType).toBe(1);
    expect(warning(feed, 'padded-values')?.count).toBe(2);
    expect(warning(feed, 'padded-values')?.examples[0]).toBe('stops.txt:3 column stop_lat');
  });

  it('drops trips whose route is unknown and counts trips without a shape', async () => {
    const feed = await readFeed(BASIC, { date: 'all' });
    expect(feed.trips.has('TX')).toBe(false);
    expect(warning(feed, 'trip-unknown-route')?.count).toBe(1);
    expect(warning(feed, 'trip-without-shape')).toMatchObject({ count: 1, examples: ['T2'] });
  });

  it("checks each row's route_id and values, also when they repeat or alternate from row to row", async () => {
    const trips = [
      'route_id,service_id,trip_id,direction_id,shape_id,trip_headsign',
      'R1,WK,T1,0,SH1,Harbour',
      'NOPE,WK,TA,0,SH1,Harbour',
      'NOPE,WK,TB,0,SH1,Harbour',
      'R1,WK,T2,1,,Harbour',
      'R2,EXTRA,T3,0,SH1,Old Town',
      'R1,WK,T4,0,SH1,Harbour',
      'R2,WK,TF,0,SH1,',
    ].join('\n');
    const feed = await readFeed(feedCopy({ 'trips.txt': trips + '\n' }), { date: 'all' });
    expect(warning(feed, 'trip-unknown-route')?.count).toBe(2);
    const got = [...feed.trips.values()].map((t) => [t.id, t.routeId, t.serviceId, t.directionId, t.shapeId, t.headsign]);
    expect(got.sort()).toEqual([
      ['T1', 'R1', 'WK', 0, 'SH1', 'Harbour'],
      ['T2', 'R1', 'WK', 1, '', 'Harbour'],
      ['T3', 'R2', 'EXTRA', 0, 'SH1', 'Old Town'],
      ['T4', 'R1', 'WK', 0, 'SH1', 'Harbour'],
      ['TF', 'R2', 'WK', 0, 'SH1', ''],
    ]);
  });

  it("with date 'all' keeps every trip and sets no date", async () => {
    const feed = await readFeed(BASIC, { date: 'all' });
    expect(feed.date).toBeNull();
    expect([...feed.trips.keys()].sort()).toEqual(['T1', 'T2', 'T3', 'T4', 'TF']);
  });

  it('on a given date applies calendar end dates inclusively and calendar_dates removals', async () => {
    // [C, GTFS Schedule reference, calendar.txt end_date: "service day ... included in the interval"]
    const last = await readFeed(BASIC, { date: '2026-09-30' });
    expect([...last.trips.keys()].sort()).toEqual(['T1', 'T2', 'TF']);
    const sat = await readFeed(BASIC, { date: '2026-09-12' });
    expect([...sat.trips.keys()]).toEqual(['T4']);
    // [C, GTFS Schedule reference, calendar_dates.txt exception_type 2: service removed for the date]
    const removed = await rejected(readFeed(BASIC, { date: '2026-09-14' }));
    expect(removed.code).toBe('empty-feed');
    expect(removed.message).toContain('2026-09-14');
    const after = await rejected(readFeed(BASIC, { date: '2026-10-01' }));
    expect(after.code).toBe('empty-feed');
  });

  it('filters routes by route_id or route_short_name', async () => {
    const byShort = await readFeed(BASIC, { routes: ['2'] });
    expect([...byShort.trips.keys()].sort()).toEqual(['T3', 'TF']);
    const byId = await readFeed(BASIC, { routes: ['R1'], date: 'all' });
    expect([...byId.trips.keys()].sort()).toEqual(['T1', 'T2', 'T4']);
    const e = await rejected(readFeed(BASIC, { routes: ['99'] }));
    expect(e.code).toBe('bad-option');
  });

  it('reads the small tables whole', async () => {
    const feed = await readFeed(BASIC);
    expect(feed.agencies).toEqual([{ id: 'VT', name: 'Vellmoor Transit', timezone: 'Europe/Berlin' }]);
    expect(feed.routes.get('R2')).toEqual({ id: 'R2', agencyId: 'VT', shortName: '2', longName: 'Mill Lane, Old Town', type: 3 });
    expect(feed.calendar).toHaveLength(2);
    expect(feed.calendarDates).toEqual([
      { serviceId: 'WK', date: '20260914', exceptionType: 2 },
      { serviceId: 'EXTRA', date: '20260916', exceptionType: 1 },
    ]);
    expect(feed.frequencies).toEqual([
      { tripId: 'TF', startS: 25200, endS: 28800, headwayS: 600, exactTimes: 1 },
      { tripId: 'TF', startS: 57600, endS: 59400, headwayS: 900, exactTimes: 0 },
    ]);
    expect(feed.feedInfo).toEqual({ publisherName: 'Vellmoor Transit', version: '2026-09a', startDate: '20260907', endDate: '20260930' });
    expect(feed.rowCounts['stop_times.txt']).toBe(16);
    expect(feed.rowCounts['trips.txt']).toBe(6);
  });

  it('reports progress per table', async () => {
    const events: ProgressEvent[] = [];
    await readFeed(BASIC, { onProgress: (e) => events.push(e) });
    const stages = new Set(events.map((e) => e.stage));
    for (const t of ['agency.txt', 'routes.txt', 'stops.txt', 'trips.txt', 'stop_times.txt', 'shapes.txt'])
      expect(stages.has(`read ${t}`)).toBe(true);
    const st = events.filter((e) => e.stage === 'read stop_times.txt');
    expect(st[st.length - 1].done).toBe(readFileSync(join(BASIC, 'stop_times.txt')).length);
  });

  it('hashes a folder by its tables and a zip by its bytes, and reads both alike', async () => {
    const a = await readFeed(BASIC);
    const b = await readFeed(feedCopy());
    expect(b.contentHash).toBe(a.contentHash);
    const c = await readFeed(feedCopy({ 'agency.txt': readFileSync(join(BASIC, 'agency.txt'), 'utf8') + '\n' }));
    expect(c.contentHash).not.toBe(a.contentHash);
    const zip = await zipFolder(BASIC);
    const z = await readFeed(zip);
    // reference: node's sha256 over the archive file as a whole
    expect(z.contentHash).toBe(createHash('sha256').update(readFileSync(zip)).digest('hex'));
    expect({ ...z, source: '', contentHash: '' }).toEqual({ ...a, source: '', contentHash: '' });
  });

  it('accepts a calendar given by calendar_dates.txt alone', async () => {
    // [C, GTFS Schedule reference, calendar_dates.txt: may be used alone, listing every service date]
    const feed = await readFeed(join(FIXTURES, 'vellmoor-dates-only'));
    expect(feed.date).toBe('2026-10-06'); // Saturday 2026-10-10 ties on trips but is no weekday
    expect([...feed.trips.keys()].sort()).toEqual(['A1', 'A2']);
    const only = await readFeed(join(FIXTURES, 'vellmoor-dates-only'), { date: '2026-10-11' });
    expect([...only.trips.keys()]).toEqual(['A2']);
  });

  it('counts and drops a stop_times row repeating a stop_sequence', async () => {
    const dir = feedCopy({ 'stop_times.txt': readFileSync(join(BASIC, 'stop_times.txt'), 'utf8') + 'T1,08:03:00,08:03:00,S3,5,,,,\n' });
    const feed = await readFeed(dir);
    expect(stopIds(feed, 'T1')).toEqual(['S1', 'S2', 'S3', 'S4', 'S5']);
    expect(warning(feed, 'repeated-stop-sequence')?.count).toBe(1);
  });

  it('reads stop_times the same whatever the order of its rows', async () => {
    // rows grouped by trip take the in-place path, rows of trips interleaved the grouping path; the
    // result must not depend on it [GTFS Schedule reference: stop_times rows may come in any order]
    const [head, ...rows] = readFileSync(join(BASIC, 'stop_times.txt'), 'utf8').trim().split('\n');
    const byTrip = new Map<string, string[]>();
    for (const r of rows) byTrip.set(r.split(',')[0], [...(byTrip.get(r.split(',')[0]) ?? []), r]);
    const groupedReversed = [...byTrip.values()].reverse().flatMap((rs) => [...rs].reverse());
    const interleaved = [...rows].sort((a, b) => a.split(',')[4].localeCompare(b.split(',')[4]) || a.localeCompare(b));
    const plain = (f: Feed) =>
      [...f.stopTimes].map(([id, st]) => [id, Object.fromEntries(Object.entries(st).map(([k, v]) => [k, [...v]]))]);
    const base = await readFeed(BASIC, { date: 'all' });
    for (const order of [groupedReversed, interleaved]) {
      const feed = await readFeed(feedCopy({ 'stop_times.txt': [head, ...order].join('\n') + '\n' }), { date: 'all' });
      expect(plain(feed)).toEqual(plain(base));
      // rows not grouped by trip are gathered at a cost in memory, and the reader says so
      expect(warning(feed, 'stop-times-not-grouped') !== undefined).toBe(order === interleaved);
    }
  });

  it('passes over the rows of trips that do not run on the date, counting them but not reading them', async () => {
    // T4 runs on Saturdays only: on a Wednesday its rows are skipped whole, so a damaged one is no error;
    // on a Saturday the same row is read and refused
    const text = readFileSync(join(BASIC, 'stop_times.txt'), 'utf8');
    const damaged = text.replace(/^T4,[^,]*,/m, 'T4,99:99:99x,');
    expect(damaged).not.toBe(text);
    const dir = feedCopy({ 'stop_times.txt': damaged });
    const weekday = await readFeed(dir, { date: '2026-09-09' });
    expect(weekday.rowCounts['stop_times.txt']).toBe(text.trim().split('\n').length - 1);
    expect(weekday.stopTimes.has('T4')).toBe(false);
    expect(weekday.stopTimes.has('T1')).toBe(true);
    const e = await rejected(readFeed(dir, { date: '2026-09-12' }));
    expect(e.code).toBe('bad-value');
    expect(e.context).toMatchObject({ file: 'stop_times.txt', column: 'arrival_time' });
  });

  it('counts blank direction_id and trips on a service no calendar defines', async () => {
    const trips =
      readFileSync(join(BASIC, 'trips.txt'), 'utf8').replace('R1,WK,T1,Uplands,0,SH1', 'R1,WK,T1,Uplands,,SH1') +
      'R1,GHOST,TG,Nowhere,0,SH1\n';
    const feed = await readFeed(feedCopy({ 'trips.txt': trips }), { date: 'all' });
    expect(feed.trips.get('T1')!.directionId).toBe(-1);
    expect(warning(feed, 'blank-direction-id')).toMatchObject({ count: 1, examples: ['T1'] });
    expect(warning(feed, 'trip-unknown-service')).toMatchObject({ count: 1, examples: ['TG'] });
  });

  it('reads an optional table of zero bytes as absent and says so', async () => {
    const feed = await readFeed(feedCopy({ 'shapes.txt': '' }));
    expect(feed.shapes.size).toBe(0);
    expect(warning(feed, 'empty-table')?.examples).toEqual(['shapes.txt']);
    expect(warning(feed, 'shape-not-found')?.count).toBe(1);
  });
});

describe('readFeed refuses', () => {
  it('a feed without a required table', async () => {
    for (const t of ['agency.txt', 'routes.txt', 'trips.txt', 'stop_times.txt', 'stops.txt']) {
      const e = await rejected(readFeed(feedCopy({ [t]: null })));
      expect(e.code).toBe('missing-table');
      expect(e.context.file).toBe(t);
    }
    const e = await rejected(readFeed(feedCopy({ 'calendar.txt': null, 'calendar_dates.txt': null })));
    expect(e.code).toBe('missing-table');
    expect(e.message).toMatch(/calendar\.txt.*calendar_dates\.txt/);
  });

  it('a table without a required column, naming the file and column', async () => {
    const e = await rejected(readFeed(feedCopy({ 'trips.txt': 'route_id,service_id,headsign\nR1,WK,x\n' })));
    expect(e.code).toBe('missing-column');
    expect(e.context).toMatchObject({ file: 'trips.txt', column: 'trip_id' });
    expect(e.oneLine()).toBe(
      'trips.txt:1 column trip_id: required column trip_id is missing: the header has "route_id", "service_id", "headsign"',
    );
  });

  it('a header whose name carries an unseen character: shows the names it saw, escaped, and the near match', async () => {
    const stops = readFileSync(join(BASIC, 'stops.txt'), 'utf8').replace(/^stop_id/, '\u200bstop_id');
    const e = await rejected(readFeed(feedCopy({ 'stops.txt': stops })));
    expect(e).toMatchObject({ code: 'missing-column', context: { file: 'stops.txt', line: 1, column: 'stop_id' } });
    expect(e.oneLine()).toBe(
      'stops.txt:1 column stop_id: required column stop_id is missing: the header has "\\u200bstop_id", "stop_code", "stop_name", "stop_lat", ' +
        '"stop_lon", "location_type", "parent_station"; "\\u200bstop_id" differs from stop_id by unseen characters',
    );
    const typo = await rejected(readFeed(feedCopy({ 'stops.txt': stops.replace('\u200bstop_id', 'stopid') })));
    expect(typo.message).toContain('"stopid" differs from stop_id by 1 letter');
    // a column of the table in its own right is never offered as a slip: stop_lat beside a missing stop_lon
    const noLon = readFileSync(join(BASIC, 'stops.txt'), 'utf8').replace(',stop_lon,', ',lon_of_stop,');
    const lon = await rejected(readFeed(feedCopy({ 'stops.txt': noLon })));
    expect(lon).toMatchObject({ code: 'missing-column', context: { column: 'stop_lon' } });
    expect(lon.message).not.toContain('differs');
  });

  it('times past the bound of 168 hours, which 32-bit columns could not hold at 596 524 hours', async () => {
    // 596 524 h = 2 147 486 400 s > 2^31 - 1 = 2 147 483 647 [D]
    for (const bad of ['596524:00:00', '168:00:01', '999999:59:59']) {
      const e = await rejected(
        readFeed(feedCopy({ 'stop_times.txt': editTable('stop_times.txt', 4, (l) => l.replace('08:00:00,08:00:00', `${bad},08:00:00`)) })),
      );
      expect(e.code, bad).toBe('bad-value');
      expect(e.context).toEqual({ file: 'stop_times.txt', line: 4, column: 'arrival_time', value: bad });
      expect(e.message).toContain('168:00:00');
    }
    const freq = await rejected(
      readFeed(feedCopy({ 'frequencies.txt': editTable('frequencies.txt', 2, (l) => l.replace('08:00:00', '600000:00:00')) })),
    );
    expect(freq).toMatchObject({
      code: 'bad-value',
      context: { file: 'frequencies.txt', line: 2, column: 'end_time', value: '600000:00:00' },
    });
  });

  it('numbers that are not decimal, and a quoted blank coordinate, instead of reading 10 or 0', async () => {
    for (const bad of ['0x34', '0b110100', '0o64', 'Infinity']) {
      const e = await rejected(readFeed(feedCopy({ 'stops.txt': editTable('stops.txt', 5, (l) => l.replace('52.5060', bad)) })));
      expect(e, bad).toMatchObject({ code: 'bad-value', context: { file: 'stops.txt', line: 5, column: 'stop_lat', value: bad } });
    }
    for (const blank of ['" "', '"\t"']) {
      const e = await rejected(readFeed(feedCopy({ 'stops.txt': editTable('stops.txt', 5, (l) => l.replace('52.5060', blank)) })));
      expect(e, blank).toMatchObject({ code: 'bad-value', context: { file: 'stops.txt', line: 5, column: 'stop_lat' } });
    }
    const dist = await rejected(
      readFeed(feedCopy({ 'stop_times.txt': editTable('stop_times.txt', 2, (l) => l.replace('1200.5', '0x4B0')) })),
    );
    expect(dist).toMatchObject({
      code: 'bad-value',
      context: { file: 'stop_times.txt', line: 2, column: 'shape_dist_traveled', value: '0x4B0' },
    });
  });
});

describe('readFeed reads an optional table with no header as absent, however it is empty', () => {
  it('zero bytes, a UTF-8 byte-order mark alone, or blank lines: the same counted warning', async () => {
    for (const body of ['', '\ufeff', '\ufeff\r\n\r\n']) {
      const feed = await readFeed(feedCopy({ 'frequencies.txt': body }));
      expect(feed.frequencies, JSON.stringify(body)).toEqual([]);
      expect(warning(feed, 'empty-table'), JSON.stringify(body)).toMatchObject({ count: 1, examples: ['frequencies.txt'] });
    }
    // a required table is not optional: a lone byte-order mark is still a missing column
    expect((await rejected(readFeed(feedCopy({ 'stops.txt': '\ufeff' })))).code).toBe('missing-column');
  });

  it('malformed times, naming file, line, column and value', async () => {
    for (const bad of ['25:99:00', '-1:00:00', '8:0:00', 'noon']) {
      const e = await rejected(
        readFeed(feedCopy({ 'stop_times.txt': editTable('stop_times.txt', 4, (l) => l.replace('08:00:00,08:00:00', `${bad},08:00:00`)) })),
      );
      expect(e.code, bad).toBe('bad-value');
      expect(e.context).toEqual({ file: 'stop_times.txt', line: 4, column: 'arrival_time', value: bad });
    }
  });

  it('non-numeric coordinates and stop_sequence', async () => {
    const lon = await rejected(readFeed(feedCopy({ 'stops.txt': editTable('stops.txt', 4, (l) => l.replace('13.4040', '13.4O4O')) })));
    expect(lon).toMatchObject({ code: 'bad-value', context: { file: 'stops.txt', line: 4, column: 'stop_lon', value: '13.4O4O' } });
    const nan = await rejected(readFeed(feedCopy({ 'stops.txt': editTable('stops.txt', 5, (l) => l.replace('52.5060', 'north')) })));
    expect(nan).toMatchObject({ code: 'bad-value', context: { file: 'stops.txt', line: 5, column: 'stop_lat', value: 'north' } });
    const seq = await rejected(
      readFeed(feedCopy({ 'stop_times.txt': editTable('stop_times.txt', 2, (l) => l.replace(',S4,10,', ',S4,ten,')) })),
    );
    expect(seq).toMatchObject({ code: 'bad-value', context: { file: 'stop_times.txt', line: 2, column: 'stop_sequence', value: 'ten' } });
  });

  it('a stop_id in stop_times that is not in stops.txt', async () => {
    const e = await rejected(readFeed(feedCopy({ 'stop_times.txt': editTable('stop_times.txt', 7, (l) => l.replace(',S2,', ',S9,')) })));
    expect(e).toMatchObject({ code: 'bad-reference', context: { file: 'stop_times.txt', line: 7, column: 'stop_id', value: 'S9' } });
  });

  it('a feed whose every trip names an unknown route', async () => {
    const e = await rejected(readFeed(feedCopy({ 'routes.txt': 'route_id,route_type\nR7,3\n' })));
    expect(e).toMatchObject({ code: 'bad-reference', context: { file: 'trips.txt', column: 'route_id' } });
  });

  it('bad options', async () => {
    expect((await rejected(readFeed(BASIC, { date: '2026-02-30' }))).code).toBe('bad-option');
    expect((await rejected(readFeed(BASIC, { date: 'tomorrow' }))).code).toBe('bad-option');
  });
});

const FEEDS = process.env.STOPSPAN_FEEDS ?? join(import.meta.dirname, '..', '..', '..', 'shared', 'feeds');
const HAVE_FEEDS = existsSync(join(FEEDS, 'nyct-bus-manhattan.zip'));
if (!HAVE_FEEDS) console.warn(`real feeds not found at ${FEEDS}: skipping readFeed on the real feeds`);

describe.skipIf(!HAVE_FEEDS)('readFeed on the real feeds', () => {
  const served = (feed: Feed) => {
    const s = new Set<number>();
    for (const st of feed.stopTimes.values()) for (const i of st.stopIdx) s.add(i);
    return s.size;
  };
  it('matches the README facts for Manhattan buses on Wednesday 2026-10-14', async () => {
    const feed = await readFeed(join(FEEDS, 'nyct-bus-manhattan.zip'), { date: '2026-10-14' });
    // [C, shared/feeds/README.md: 8 575 trips and 1 822 stops served on 2026-10-14]
    expect(feed.trips.size).toBe(8575);
    expect(served(feed)).toBe(1822);
    // [C, shared/feeds/README.md: 1 824 stops, 37 872 trips, 1 174 914 stop_times rows]
    expect(feed.stops.length).toBe(1824);
    expect(feed.rowCounts['trips.txt']).toBe(37872);
    expect(feed.rowCounts['stop_times.txt']).toBe(1174914);
    // [C, shared/feeds/README.md: stop_lat and stop_lon padded with spaces in the bus feeds]
    expect(warning(feed, 'padded-values')!.count).toBeGreaterThanOrEqual(2 * 1824);
    for (const st of feed.stopTimes.values()) for (let k = 1; k < st.seq.length; k++) expect(st.seq[k]).toBeGreaterThan(st.seq[k - 1]);
  });

  it('matches the README facts for the subway on 2026-10-14', async () => {
    const feed = await readFeed(join(FEEDS, 'nyct-subway.zip'), { date: '2026-10-14' });
    // [C, shared/feeds/README.md: 8 497 trips and 989 stops served on 2026-10-14]
    expect(feed.trips.size).toBe(8497);
    expect(served(feed)).toBe(989);
  });

  it('gives every kept trip the route, service, headsign, shape and direction its trips.txt row has', async () => {
    // csv-parse (the reference reader) over trips.txt as the oracle: the reader reuses a column's string
    // from the row before when the value repeats, and this checks that it never carries one over wrongly
    const file = join(FEEDS, 'nyct-bus-manhattan.zip');
    const feed = await readFeed(file, { date: 'all' });
    const archive = await openFeed(file);
    const rows: Record<string, string>[] = [];
    try {
      const parser = (await archive.open('trips.txt')).pipe(parseStream({ bom: true, trim: true, columns: true, skip_empty_lines: true }));
      for await (const r of parser) rows.push(r as Record<string, string>);
    } finally {
      await archive.close();
    }
    expect(rows.length).toBe(37872); // [C, shared/feeds/README.md: 37 872 trips]
    let checked = 0;
    for (const r of rows) {
      const t = feed.trips.get(r.trip_id);
      if (!t) continue;
      expect(t, r.trip_id).toEqual({
        id: r.trip_id,
        routeId: r.route_id,
        serviceId: r.service_id,
        directionId: r.direction_id === '' ? -1 : Number(r.direction_id),
        headsign: r.trip_headsign ?? '',
        shapeId: r.shape_id ?? '',
      });
      checked++;
    }
    expect(checked).toBe(feed.trips.size);
  });

  it('chooses a weekday inside the service range by default', async () => {
    const feed = await readFeed(join(FEEDS, 'nyct-bus-manhattan.zip'));
    // [C, shared/feeds/README.md: bus service 2026-09-06 to 2027-01-02, weekday services from 2026-09-08]
    expect(feed.date! >= '2026-09-08' && feed.date! <= '2027-01-02').toBe(true);
    expect([1, 2, 3, 4, 5]).toContain(new Date(`${feed.date}T12:00:00Z`).getUTCDay());
    expect(feed.trips.size).toBeGreaterThanOrEqual(8575); // the busiest weekday has at least as many as 2026-10-14
  });
});

describe('readFeed caps on shapes', () => {
  it(`refuses a shape of more than ${SHAPE_CAPS.pointsPerShape} points as too large, naming it, and reads one of that many`, async () => {
    const pts = (n: number) => {
      const lines = ['shape_id,shape_pt_lat,shape_pt_lon,shape_pt_sequence'];
      for (let k = 0; k < n; k++) lines.push(`SH1,${(52.5 + k * 1e-7).toFixed(7)},13.4,${k + 1}`);
      return lines.join('\n') + '\n';
    };
    const e = await rejected(readFeed(feedCopy({ 'shapes.txt': pts(SHAPE_CAPS.pointsPerShape + 1) })));
    expect(e.code).toBe('feed-too-large');
    expect(e.context.file).toBe('shapes.txt');
    expect(e.context.line).toBe(SHAPE_CAPS.pointsPerShape + 2);
    expect(e.oneLine()).toContain('SH1');
    const feed = await readFeed(feedCopy({ 'shapes.txt': pts(SHAPE_CAPS.pointsPerShape) }));
    expect(feed.shapes.get('SH1')!.lat.length).toBe(SHAPE_CAPS.pointsPerShape);
  });
});

describe('readFeed cap on trips', () => {
  it(`refuses trips.txt of more than ${MAX_TRIPS} trips as too large while it is read, naming the row, and reads that many`, async () => {
    // the fixture's header and a weekday service; one row of stop_times keeps the feed readable under the cap
    const trips = (n: number) => {
      const lines = ['route_id,service_id,trip_id,trip_headsign,direction_id,shape_id'];
      for (let k = 0; k < n; k++) lines.push(`R1,WK,FLOOD-${k},Uplands,0,`);
      return lines.join('\n') + '\n';
    };
    const stopTimes =
      'trip_id,arrival_time,departure_time,stop_id,stop_sequence\nFLOOD-0,08:00:00,08:00:00,S1,1\nFLOOD-0,08:05:00,08:05:00,S2,2\n';
    const started = Date.now();
    const e = await rejected(
      readFeed(feedCopy({ 'trips.txt': trips(MAX_TRIPS + 1), 'stop_times.txt': stopTimes, 'frequencies.txt': null })),
    );
    expect(e.code).toBe('feed-too-large');
    expect(e.context.file).toBe('trips.txt');
    expect(e.context.line).toBe(MAX_TRIPS + 2);
    expect(e.context.column).toBe('trip_id');
    expect(e.oneLine()).toContain(`FLOOD-${MAX_TRIPS}`);
    expect(e.oneLine()).toContain(String(MAX_TRIPS));
    // a duplicate trip_id is dropped (and counted), not held, so it does not count towards the cap
    const dup = trips(MAX_TRIPS) + 'R1,WK,FLOOD-0,Uplands,0,\n';
    const feed = await readFeed(feedCopy({ 'trips.txt': dup, 'stop_times.txt': stopTimes, 'frequencies.txt': null }));
    expect(feed.rowCounts['trips.txt']).toBe(MAX_TRIPS + 1);
    expect(warning(feed, 'duplicate-trip-id')?.count).toBe(1);
    expect(Date.now() - started).toBeLessThan(60_000);
  }, 90_000);
});
