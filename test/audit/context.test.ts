// Other feeds as context: a rail station 60 m from a bus stop (in a context feed on disk) makes the stop a
// transfer point, kept with a note naming the station; an unreadable context feed is one error naming it;
// no service on the date is a counted warning; ids are namespaced by the feed. Invented city of Vellmoor.
import { mkdtempSync, mkdirSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readContextFeed } from '../../src/gtfs/readContext.js';
import { stopsNearStations, CONTEXT_STATION_RADIUS_M } from '../../src/network/contextStations.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { WarningSink } from '../../src/common/warnings.js';
import { haversineM } from '../../src/network/geodesy.js';
import { buildFeed, street } from '../helpers/buildFeed.js';
import { rejected } from '../helpers/errors.js';

const work = mkdtempSync(join(tmpdir(), 'stopspan-context-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

const bus = street(12, 150);
// 60 m north of the sixth bus stop: 60 / 111 320 degrees of latitude ([D] metres per degree of latitude, spherical earth)
const station = { lat: bus[5].lat + 60 / 111_320, lon: bus[5].lon };

function railFolder(name: string, { calendarStart = '20260101', stopId = 'S6' } = {}): string {
  const dir = join(work, name);
  mkdirSync(dir, { recursive: true });
  writeFileSync(
    join(dir, 'stops.txt'),
    `stop_id,stop_name,stop_lat,stop_lon,location_type,parent_station\n${stopId},Vellmoor Central,${station.lat},${station.lon},1,\n${stopId}-p1,Vellmoor Central platform 1,${station.lat},${station.lon},0,${stopId}\nFAR,Vellmoor Docks,${station.lat + 0.05},${station.lon},1,\n`,
  );
  writeFileSync(
    join(dir, 'calendar.txt'),
    `service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWK,1,1,1,1,1,0,0,${calendarStart},20261231\n`,
  );
  return dir;
}

function busNetwork() {
  const ids = bus.map((s) => s.id);
  const net = buildFeed({
    stops: bus,
    trips: [{ id: 'b1', routeId: 'R1', times: ids.map((s, k) => [s, 28800 + 30 * k, 28800 + 30 * k] as [string, number, number]) }],
  });
  for (const p of net.patterns.patterns) p.tripsPerDay = 60;
  return net;
}

describe('context feeds', () => {
  it('reads only stations, namespaced by the feed, and counts services on the date', async () => {
    const warnings = new WarningSink();
    const c = await readContextFeed(railFolder('vellmoor-rail'), { date: '2026-10-14', warnings });
    expect(c.label).toBe('vellmoor-rail');
    // the bus feed also has a stop "S6": the station's id is the context feed's own, and cannot collide
    expect(c.stations.map((s) => s.id)).toEqual(['vellmoor-rail:S6', 'vellmoor-rail:FAR']);
    expect(c.servicesOnDate).toBe(1);
    expect(warnings.list()).toEqual([]);
  });

  it('makes the bus stop 60 m from a station a transfer point, naming the station', async () => {
    const { feed, patterns } = busNetwork();
    const c = await readContextFeed(railFolder('vellmoor-rail'), { date: '2026-10-14', warnings: new WarningSink() });
    const d = haversineM(bus[5].lat, bus[5].lon, station.lat, station.lon);
    expect(d).toBeGreaterThan(59);
    expect(d).toBeLessThan(61);
    const near = stopsNearStations(feed, patterns, [c]);
    expect([...near.keys()]).toEqual([feed.stopIndex.get('S6')]); // its neighbours are 150 m along and 60 m up: 162 m > 150 m
    expect(CONTEXT_STATION_RADIUS_M).toBe(150);
    const r = runAudit(feed, patterns, { params: { cruise_speed_mps: 11.176 }, generatedAt: 'x', stations: near });
    const row = r.stops.find((s) => s.stopId === 'S6')!;
    expect(row).toMatchObject({ verdict: 'fixed', fixedReason: 'station', fixedNote: 'station Vellmoor Central (vellmoor-rail), 60 m' });
    expect(r.candidates.some((x) => x.stopId === 'S6')).toBe(false);
    // without the context the same stop is an ordinary stop
    const plain = runAudit(feed, patterns, { params: { cruise_speed_mps: 11.176 }, generatedAt: 'x' });
    expect(plain.stops.find((s) => s.stopId === 'S6')!.fixedReason).toBe('');
  });

  it('warns, counted, when the context feed has no service on the date', async () => {
    const warnings = new WarningSink();
    const c = await readContextFeed(railFolder('vellmoor-rail-2027', { calendarStart: '20261201' }), { date: '2026-10-14', warnings });
    expect(c.servicesOnDate).toBe(0);
    expect(warnings.list().find((w) => w.code === 'context-no-service')?.count).toBe(1);
  });

  it('fails with one error naming the context feed when it cannot be read', async () => {
    const missing = join(work, 'no-such-feed.zip');
    const e = await rejected(readContextFeed(missing, { warnings: new WarningSink() }));
    expect(e.code).toBe('feed-unreadable');
    expect(e.oneLine()).toContain('context feed');
    expect(e.oneLine()).toContain('no-such-feed');
    const dir = join(work, 'no-stops');
    mkdirSync(dir, { recursive: true });
    writeFileSync(join(dir, 'calendar.txt'), 'service_id\n');
    const e2 = await rejected(readContextFeed(dir, { warnings: new WarningSink() }));
    expect(e2.oneLine()).toMatch(/no-stops\/stops\.txt.*context feed/);
  });
});
