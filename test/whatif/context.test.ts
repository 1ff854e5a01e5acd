// What-if with other feeds as context (--context): a removal or move of a stop within walking distance of a
// context feed's station says so, naming the station and the distance, in the result, the text and the page;
// the figures themselves do not change. A hand-made street in the invented city of Vellmoor with a hand-made
// rail feed on disk, then the built command on the demo feed with a station placed beside one of its stops.
import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { contextStops } from '../../src/network/contextStations.js';
import { evaluateScenario } from '../../src/whatif/whatif.js';
import { whatifText } from '../../src/report/whatifText.js';
import { readFeed } from '../../src/gtfs/readFeed.js';
import { haversineM } from '../../src/network/geodesy.js';
import { buildFeed, street } from '../helpers/buildFeed.js';
import { ROOT, runCli } from '../helpers/cli.js';

const work = mkdtempSync(join(tmpdir(), 'stopspan-whatif-context-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

/** A rail feed folder with one station (and its platform) at the given place, running on weekdays of 2026. */
function railFolder(name: string, at: { lat: number; lon: number }): string {
  const dir = join(work, name);
  mkdirSync(dir, { recursive: true });
  writeFileSync(
    join(dir, 'stops.txt'),
    `stop_id,stop_name,stop_lat,stop_lon,location_type,parent_station\nC1,Vellmoor Central,${at.lat},${at.lon},1,\nC1-p,Vellmoor Central platform,${at.lat},${at.lon},0,C1\n`,
  );
  writeFileSync(
    join(dir, 'calendar.txt'),
    'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWK,1,1,1,1,1,0,0,20260101,20261231\n',
  );
  return dir;
}

// 60 m north of a point: 60 / 111 320 degrees of latitude ([D] metres per degree of latitude on a sphere of radius 6 378 km, 2 pi R / 360)
const north60 = (p: { lat: number; lon: number }) => ({ lat: p.lat + 60 / 111_320, lon: p.lon });

describe('whatif with a context feed', () => {
  const bus = street(10, 250);
  const rail = north60(bus[4]);
  const network = () => {
    const ids = bus.map((s) => s.id);
    const net = buildFeed({
      stops: bus,
      trips: [{ id: 'b1', routeId: 'R1', times: ids.map((s, k) => [s, 28800 + 40 * k, 28800 + 40 * k] as [string, number, number]) }],
    });
    for (const p of net.patterns.patterns) p.tripsPerDay = 60;
    return net;
  };

  it('names the station beside a removed stop, and leaves the figures as they were', async () => {
    const { feed, patterns } = network();
    const stations = (await contextStops(feed, patterns, [railFolder('vellmoor-rail', rail)])).near;
    const d = haversineM(bus[4].lat, bus[4].lon, rail.lat, rail.lon);
    expect(Math.round(d)).toBe(60);
    const params = { cruise_speed_mps: 11.176 };
    const near = evaluateScenario(feed, patterns, { remove: ['S5', 'S8'] }, { params, stations });
    const changes = near.patterns[0].changes;
    expect(changes.map((c) => [c.stopId, c.nearStation])).toEqual([
      ['S5', 'station Vellmoor Central (vellmoor-rail), 60 m'],
      ['S8', ''], // 750 m along the street from the station
    ]);
    const plain = evaluateScenario(feed, patterns, { remove: ['S5', 'S8'] }, { params });
    expect(plain.patterns[0].changes.every((c) => c.nearStation === '')).toBe(true);
    expect(near.totals.netPaxMinPerDay).toBeCloseTo(plain.totals.netPaxMinPerDay, 9);
    const text = whatifText(near);
    expect(text).toMatch(/removes S5 Vellmoor S5: [^\n]*; beside station Vellmoor Central \(vellmoor-rail\), 60 m !$/m);
    expect(text).toMatch(
      /^other modes: 1 stop this changes lies within walking distance of a station of a context feed, a transfer point the audit keeps \(marked !\): S5 Vellmoor S5 \(station Vellmoor Central \(vellmoor-rail\), 60 m\)$/m,
    );
    expect(whatifText(plain)).not.toContain('other modes');
  });
});

describe('stopspan whatif --context on the demo feed', () => {
  const DEMO = join(ROOT, 'fixtures/demo/demo-feed.zip');
  let context = '';
  beforeAll(async () => {
    const feed = await readFeed(DEMO, { date: 'all' });
    const stop = feed.stops[feed.stopIndex.get('MKT-05-a')!];
    context = railFolder('vellmoor-metro', north60(stop));
  });

  it('flags the removal in the text, the JSON and the page', async () => {
    const out = join(work, 'page');
    const r = await runCli(['whatif', DEMO, '--remove', 'MKT-05-a', '--context', context, '--out', out, '--json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    const change = doc.patterns.flatMap((p: any) => p.changes).find((c: any) => c.stop_id === 'MKT-05-a');
    expect(change.near_station).toBe('station Vellmoor Central (vellmoor-metro), 60 m');
    const { readFileSync } = await import('node:fs');
    expect(readFileSync(join(out, 'index.html'), 'utf8')).toContain(
      '<li class="near-station">Market St / Gorse Hill Rd (MKT-05-a) removed beside station Vellmoor Central (vellmoor-metro), 60 m: a transfer point to another mode, which the audit keeps.</li>',
    );
    const t = await runCli(['whatif', DEMO, '--remove', 'MKT-05-a', '--context', context]);
    expect(t.stdout).toMatch(
      /removes MKT-05-a Market St \/ Gorse Hill Rd: [^\n]*; beside station Vellmoor Central \(vellmoor-metro\), 60 m !$/m,
    );
  });

  it('refuses an unreadable context feed with one line naming it', async () => {
    const r = await runCli(['whatif', DEMO, '--remove', 'MKT-05-a', '--context', join(work, 'no-such-rail.zip')]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^error: .*context feed .*no-such-rail\.zip.*\n$/);
  });
});
