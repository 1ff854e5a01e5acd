// The demo city's fixtures: the generator is deterministic (regenerating gives the committed bytes), every
// table is well-formed and referentially consistent when read by an outside parser (csv-parse), and the
// feed shows each feature the demo is meant to show.

import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { readZip } from './helpers/zip.js';
import geodesicPkg from 'geographiclib-geodesic';

type Row = Record<string, string>;
type Tables = Map<string, Row[]>;

const ROOT = join(import.meta.dirname, '..');
const DEMO = join(ROOT, 'fixtures', 'demo');
const WGS84 = geodesicPkg.Geodesic.WGS84;
// Karney's geodesic on the WGS84 ellipsoid (geographiclib-geodesic), the outside reference for lengths
const geoM = (a: [number, number], b: [number, number]) => WGS84.Inverse(a[0], a[1], b[0], b[1]).s12 as number;

/** Parses every table with csv-parse in strict mode: a ragged row, a bad quote or a duplicate header throws. */
function parseTables(entries: Map<string, Buffer>): Tables {
  const t: Tables = new Map();
  for (const [name, buf] of entries) {
    const text = buf.toString('utf8');
    expect(Buffer.from(text, 'utf8').equals(buf), `${name} is valid UTF-8`).toBe(true);
    const header = (parse(text, { to_line: 1 }) as string[][])[0];
    expect(new Set(header).size, `${name} has no duplicate header`).toBe(header.length);
    const rows = parse(text, { columns: true, skip_empty_lines: true, relax_column_count: false }) as Row[];
    t.set(name.replace(/\.txt$/, ''), rows);
  }
  return t;
}

const col = (t: Tables, name: string) => t.get(name) ?? [];

let tmp = '';
let feed: Tables;
let next: Tables;

beforeAll(async () => {
  tmp = mkdtempSync(join(tmpdir(), 'stopspan-demo-'));
  // a far-off time zone on purpose: the generator pins its own, so the zip timestamps cannot drift
  const env = { ...process.env, TZ: 'Pacific/Auckland' };
  const run = spawnSync(process.execPath, [join(ROOT, 'scripts', 'make-demo.mjs'), '--out', tmp], { encoding: 'utf8', env });
  expect(run.status, run.stderr).toBe(0);
  feed = parseTables(await readZip(join(DEMO, 'demo-feed.zip')));
  next = parseTables(await readZip(join(DEMO, 'demo-feed-next.zip')));
});
afterAll(() => {
  if (tmp) rmSync(tmp, { recursive: true, force: true });
});

describe('the demo generator', () => {
  it('regenerates byte for byte what is committed', () => {
    for (const f of ['demo-feed.zip', 'demo-feed-next.zip', 'ridership.csv', 'land-use.geojson']) {
      const fresh = readFileSync(join(tmp, f));
      const committed = readFileSync(join(DEMO, f));
      expect(fresh.equals(committed), `${f} regenerated differs from fixtures/demo/${f}: run npm run demo:generate`).toBe(true);
    }
  });

  it('keeps each zip well under 1 MB', () => {
    for (const f of ['demo-feed.zip', 'demo-feed-next.zip']) expect(statSync(join(DEMO, f)).size).toBeLessThan(600_000);
  });
});

describe.each([
  ['demo-feed.zip', () => feed],
  ['demo-feed-next.zip', () => next],
])('%s, read with csv-parse', (_name, get) => {
  it('holds the required tables with their required columns (GTFS Schedule reference [C])', () => {
    const t = get();
    const required: Record<string, string[]> = {
      agency: ['agency_name', 'agency_url', 'agency_timezone'],
      routes: ['route_id', 'route_type'],
      trips: ['route_id', 'service_id', 'trip_id'],
      stop_times: ['trip_id', 'stop_id', 'stop_sequence'],
      stops: ['stop_id'],
      calendar: ['service_id', 'monday', 'sunday', 'start_date', 'end_date'],
      feed_info: ['feed_publisher_name', 'feed_publisher_url', 'feed_lang', 'feed_version'],
    };
    for (const [table, cols] of Object.entries(required)) {
      const rows = col(t, table);
      expect(rows.length, table).toBeGreaterThan(0);
      for (const c of cols) expect(Object.keys(rows[0]), `${table}.${c}`).toContain(c);
    }
  });

  it('is referentially consistent', () => {
    const t = get();
    const stops = new Map(col(t, 'stops').map((s) => [s.stop_id, s]));
    const routes = new Set(col(t, 'routes').map((r) => r.route_id));
    const agencies = new Set(col(t, 'agency').map((a) => a.agency_id));
    const services = new Set([...col(t, 'calendar'), ...col(t, 'calendar_dates')].map((c) => c.service_id));
    const shapes = new Set(col(t, 'shapes').map((s) => s.shape_id));
    const trips = new Map(col(t, 'trips').map((r) => [r.trip_id, r]));
    expect(trips.size).toBe(col(t, 'trips').length); // trip_id unique
    expect(stops.size).toBe(col(t, 'stops').length); // stop_id unique
    for (const r of col(t, 'routes')) expect(agencies.has(r.agency_id), r.route_id).toBe(true);
    for (const r of col(t, 'trips')) {
      expect(routes.has(r.route_id), `trip ${r.trip_id} route`).toBe(true);
      expect(services.has(r.service_id), `trip ${r.trip_id} service`).toBe(true);
      if (r.shape_id) expect(shapes.has(r.shape_id), `trip ${r.trip_id} shape`).toBe(true);
    }
    const tripsWithTimes = new Set<string>();
    const bad: string[] = []; // collected, then asserted once: 46 000 rows
    for (const st of col(t, 'stop_times')) {
      const s = stops.get(st.stop_id);
      if (!s) bad.push(`stop_times stop ${st.stop_id}`);
      // stop_times reference stops or platforms, never stations (location_type 0 or empty) [C GTFS reference]
      else if (s.location_type !== '' && s.location_type !== '0') bad.push(`stop_times station ${st.stop_id}`);
      if (!trips.has(st.trip_id)) bad.push(`stop_times trip ${st.trip_id}`);
      tripsWithTimes.add(st.trip_id);
    }
    expect(bad).toEqual([]);
    expect(tripsWithTimes.size).toBe(trips.size); // every trip has stop_times
    for (const s of col(t, 'stops')) {
      if (s.parent_station) expect(stops.get(s.parent_station)?.location_type, s.stop_id).toBe('1');
      const lat = Number(s.stop_lat);
      const lon = Number(s.stop_lon);
      expect(lat > 44.8 && lat < 45.2 && lon > 9.8 && lon < 10.2, `${s.stop_id} inside the city`).toBe(true);
    }
    for (const f of col(t, 'frequencies')) expect(trips.has(f.trip_id), f.trip_id).toBe(true);
  });

  it('orders every trip by a strictly increasing stop_sequence with non-decreasing times', () => {
    const t = get();
    const last = new Map<string, { seq: number; timeS: number }>();
    const toS = (v: string) => {
      const [h, m, s] = v.split(':').map(Number);
      return h * 3600 + m * 60 + s;
    };
    const bad: string[] = [];
    for (const st of col(t, 'stop_times')) {
      const seq = Number(st.stop_sequence);
      if (!Number.isInteger(seq)) bad.push(`${st.trip_id} seq ${st.stop_sequence}`);
      const prev = last.get(st.trip_id);
      const timeS = st.arrival_time ? toS(st.arrival_time) : (prev?.timeS ?? 0);
      if (prev) {
        if (!(seq > prev.seq)) bad.push(`${st.trip_id} seq ${seq} after ${prev.seq}`);
        if (!(timeS >= prev.timeS)) bad.push(`${st.trip_id} time ${st.arrival_time}`);
      } else if (st.arrival_time === '') bad.push(`${st.trip_id} first stop untimed`);
      if (st.departure_time && toS(st.departure_time) < timeS) bad.push(`${st.trip_id} departs before arriving`);
      last.set(st.trip_id, { seq, timeS: st.departure_time ? toS(st.departure_time) : timeS });
    }
    expect(bad).toEqual([]);
  });
});

describe('the demo city shows each feature', () => {
  const tripsOf = (routeId: string) => col(feed, 'trips').filter((r) => r.route_id === routeId);
  const timesOf = (tripId: string) => col(feed, 'stop_times').filter((r) => r.trip_id === tripId);
  const stopLL = () => new Map(col(feed, 'stops').map((s) => [s.stop_id, [Number(s.stop_lat), Number(s.stop_lon)] as [number, number]]));

  it('has 8 to 12 bus routes and a feed_version', () => {
    const routes = col(feed, 'routes');
    expect(routes.length).toBeGreaterThanOrEqual(8);
    expect(routes.length).toBeLessThanOrEqual(12);
    expect(routes.every((r) => r.route_type === '3')).toBe(true);
    expect(col(feed, 'feed_info')[0].feed_version).not.toBe(col(next, 'feed_info')[0].feed_version);
  });

  it('runs weekday, Saturday and Sunday service from 2026-11-02 to 2027-03-31 with removed and added days', () => {
    const cal = col(feed, 'calendar');
    expect(cal.map((c) => c.service_id).sort()).toEqual(['SAT', 'SUN', 'WKDY']);
    for (const c of cal) expect([c.start_date, c.end_date]).toEqual(['20261102', '20270331']);
    // exception_type 2 removes service and 1 adds it [C GTFS reference]
    const cd = col(feed, 'calendar_dates');
    expect(cd.some((d) => d.service_id === 'WKDY' && d.exception_type === '2' && d.date === '20261225')).toBe(true);
    expect(cd.some((d) => d.service_id === 'FAIR' && d.exception_type === '1')).toBe(true);
    expect(cal.some((c) => c.service_id === 'FAIR')).toBe(false); // a service defined only by calendar_dates
    expect(new Date(Date.UTC(2026, 11, 25)).getUTCDay()).toBe(5); // the holiday is a Friday, so it removes real weekday service
  });

  it('has frequency-based routes with exact_times 1 and 0', () => {
    const ex = new Set(col(feed, 'frequencies').map((f) => f.exact_times));
    expect(ex).toEqual(new Set(['0', '1']));
  });

  it('has old-town stretches of stops 70-145 m apart on routes 1 and 2 and a bridge gap over 2 km (geographiclib distances)', () => {
    const ll = stopLL();
    const gaps = (tripId: string) => {
      const sts = timesOf(tripId);
      return sts.slice(1).map((s, i) => geoM(ll.get(sts[i].stop_id)!, ll.get(s.stop_id)!));
    };
    // a block apart, as in an old city grid: well under the ~400 m (quarter-mile) spacing that transit
    // guidelines commonly give for local buses (common practice, from memory)
    for (const [tripId, minClose] of [
      ['R1-WKDY-0-001', 16],
      ['R2-WKDY-0-001', 14],
    ] as const) {
      const g = gaps(tripId);
      const oldTown = g.filter((x) => x < 230);
      expect(oldTown.length, tripId).toBeGreaterThanOrEqual(minClose);
      for (const x of oldTown) expect(x, tripId).toBeGreaterThan(65);
      for (const x of oldTown) expect(x, tripId).toBeLessThan(225);
      expect(oldTown.filter((x) => x < 90).length, `${tripId}: some pairs about 80 m apart`).toBeGreaterThanOrEqual(3);
      // most gaps a block long; the few longer ones flank Central Square, which keeps other stops 110 m off
      expect(oldTown.filter((x) => x <= 145).length / oldTown.length, tripId).toBeGreaterThan(0.75);
      // and the rest of the route is spaced wider: more than 300 m outside the old town
      expect(
        g.filter((x) => x >= 230).every((x) => x > 300),
        tripId,
      ).toBe(true);
    }
    expect(Math.max(...gaps('R20-WKDY-0-001'))).toBeGreaterThan(2000);
  });

  it('alternates busy and quiet stops in the old town: quiet ones between busy neighbours', () => {
    const rows = parse(readFileSync(join(DEMO, 'ridership.csv')), { columns: true }) as Row[];
    const use = new Map(
      rows.filter((r) => r.route_id === 'R1' && r.direction_id === '0').map((r) => [r.stop_id, Number(r.boardings) + Number(r.alightings)]),
    );
    const ll = stopLL();
    const sts = timesOf('R1-WKDY-0-001').map((s) => s.stop_id);
    let quietBetweenBusy = 0;
    for (let i = 1; i < sts.length - 1; i++) {
      const gapM = geoM(ll.get(sts[i - 1])!, ll.get(sts[i])!);
      const [u0, u, u1] = [use.get(sts[i - 1])!, use.get(sts[i])!, use.get(sts[i + 1])!];
      if (gapM < 150 && u * 4 < Math.min(u0, u1)) quietBetweenBusy++;
    }
    expect(quietBetweenBusy).toBeGreaterThanOrEqual(3);
  });

  it('writes shape_dist_traveled in metres on route 1 and in kilometres on route 10, matching geographiclib lengths', () => {
    const shapeRows = col(feed, 'shapes');
    const check = (shapeId: string, unitM: number) => {
      const pts = shapeRows.filter((p) => p.shape_id === shapeId);
      let lenM = 0;
      for (let i = 1; i < pts.length; i++) {
        lenM += geoM(
          [Number(pts[i - 1].shape_pt_lat), Number(pts[i - 1].shape_pt_lon)],
          [Number(pts[i].shape_pt_lat), Number(pts[i].shape_pt_lon)],
        );
      }
      const declared = Number(pts[pts.length - 1].shape_dist_traveled) * unitM;
      expect(Math.abs(declared - lenM) / lenM).toBeLessThan(0.005); // within 0.5 % of the geodesic length
    };
    check('R1-shp-0', 1);
    check('R10-shp-0', 1000);
    expect(col(feed, 'shapes').some((p) => p.shape_id === 'R2-shp-0' && p.shape_dist_traveled === '')).toBe(true);
    expect(tripsOf('R50').every((t) => t.shape_id === '')).toBe(true); // a route without shapes
  });

  it('leaves times blank between timepoints on route 10', () => {
    const sts = timesOf('R10-WKDY-0-001');
    const blank = sts.filter((s) => s.arrival_time === '');
    expect(blank.length).toBeGreaterThan(10);
    expect(blank.every((s) => s.timepoint === '0')).toBe(true);
    expect(sts.filter((s) => s.arrival_time !== '').every((s) => s.timepoint === '1')).toBe(true);
  });

  it('shares a transfer stop among several routes, runs a loop and closes one stop on one trip', () => {
    const routeOfTrip = new Map(col(feed, 'trips').map((t) => [t.trip_id, t.route_id]));
    const routesAt = new Set(
      col(feed, 'stop_times')
        .filter((s) => s.stop_id === 'CSQ')
        .map((s) => routeOfTrip.get(s.trip_id)),
    );
    expect(routesAt.size).toBeGreaterThanOrEqual(3);
    const loop = timesOf('R30-WKDY-0-001');
    expect(loop[0].stop_id).toBe(loop[loop.length - 1].stop_id);
    const closed = col(feed, 'stop_times').filter((s) => s.pickup_type === '1' && s.drop_off_type === '1');
    expect(new Set(closed.map((s) => s.trip_id)).size).toBe(1);
  });

  it('has service past midnight written as hours beyond 24 (GTFS reference [C])', () => {
    expect(col(feed, 'stop_times').some((s) => s.arrival_time >= '24:00:00')).toBe(true);
  });
});

describe('the ridership file', () => {
  const rows = parse(readFileSync(join(DEMO, 'ridership.csv')), { columns: true }) as Row[];

  it('has the counter-export columns and refers only to served stops and routes', () => {
    expect(Object.keys(rows[0])).toEqual(['stop_id', 'route_id', 'direction_id', 'boardings', 'alightings']);
    const served = new Set(col(feed, 'stop_times').map((s) => s.stop_id));
    const routes = new Set(col(feed, 'routes').map((r) => r.route_id));
    for (const r of rows) {
      expect(served.has(r.stop_id), r.stop_id).toBe(true);
      expect(routes.has(r.route_id), r.route_id).toBe(true);
      expect(Number.isInteger(Number(r.boardings)) && Number(r.boardings) >= 0).toBe(true);
      expect(Number.isInteger(Number(r.alightings)) && Number(r.alightings) >= 0).toBe(true);
    }
  });

  it('balances boardings and alightings per route and direction within rounding', () => {
    const sums = new Map<string, { b: number; a: number; n: number }>();
    for (const r of rows) {
      const k = `${r.route_id}|${r.direction_id}`;
      const s = sums.get(k) ?? { b: 0, a: 0, n: 0 };
      s.b += Number(r.boardings);
      s.a += Number(r.alightings);
      s.n += 1;
      sums.set(k, s);
    }
    expect(sums.size).toBeGreaterThanOrEqual(15);
    for (const [k, s] of sums) {
      expect(s.b, k).toBeGreaterThan(100);
      expect(Math.abs(s.b - s.a), k).toBeLessThanOrEqual(s.n); // each row rounds by at most 0.5 twice
    }
  });
});

describe('the next feed version', () => {
  it('removes a few stops, moves one by about 60 m and renames one', () => {
    const before = new Map(col(feed, 'stops').map((s) => [s.stop_id, s]));
    const after = new Map(col(next, 'stops').map((s) => [s.stop_id, s]));
    const removed = [...before.keys()].filter((id) => !after.has(id));
    expect(removed.length).toBeGreaterThanOrEqual(2);
    expect(removed.length).toBeLessThanOrEqual(6);
    expect([...after.keys()].filter((id) => !before.has(id))).toEqual([]);
    const moved: number[] = [];
    const renamed: string[] = [];
    for (const [id, a] of after) {
      const b = before.get(id)!;
      const d = geoM([Number(b.stop_lat), Number(b.stop_lon)], [Number(a.stop_lat), Number(a.stop_lon)]);
      if (d > 1) moved.push(d);
      if (a.stop_name !== b.stop_name) renamed.push(id);
    }
    expect(moved.length).toBe(1);
    expect(moved[0]).toBeGreaterThan(55);
    expect(moved[0]).toBeLessThan(65);
    expect(renamed.length).toBe(1);
    const servedNext = new Set(col(next, 'stop_times').map((s) => s.stop_id));
    for (const id of removed) expect(servedNext.has(id)).toBe(false);
  });
});
