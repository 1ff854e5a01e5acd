// Context stations as evidence for additions: a wide gap on a hand-made Vellmoor street with nobody else's
// stop near its middle is listed for review; a station of a hand-made rail feed on disk (given as context)
// within a walk of the gap's middle is evidence for a stop there (the gap is no longer one to review), named in
// the evidence; a station by the
// gap's end says nothing about its middle, as another route's stop there would not.
import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { contextStops } from '../../src/network/contextStations.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { additionEvidence, buildStopIndex, WALK_REACH_M } from '../../src/audit/additionEvidence.js';
import { haversineM } from '../../src/network/geodesy.js';
import { buildFeed } from '../helpers/buildFeed.js';

const work = mkdtempSync(join(tmpdir(), 'stopspan-context-evidence-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

const LAT0 = 52.37;
// [D] metres per degree on a sphere of radius 6 378 km: 2 pi R / 360 = 111 320 m of latitude, times cos(lat) of longitude
const M_PER_DEG_LAT = 111_320;
const place = (eastM: number, northM = 0) => ({
  lat: LAT0 + northM / M_PER_DEG_LAT,
  lon: 4.9 + eastM / (M_PER_DEG_LAT * Math.cos((LAT0 * Math.PI) / 180)),
});
const ALONG = [0, 150, 300, 450, 600, 750, 2150, 2300, 2450]; // the gap: 750 -> 2150 m, 1.4 km, middle at 1450 m

function quayRoad() {
  const stops = ALONG.map((d, j) => ({ id: `m${j}`, name: `Quay Road ${j}`, ...place(d) }));
  // 5 m/s along the street: a local bus, not a fast stretch
  let t = 28800;
  const times = ALONG.map((d, j) => {
    if (j > 0) t += (d - ALONG[j - 1]) / 5;
    return [`m${j}`, t, t] as [string, number, number];
  });
  const net = buildFeed({ stops, trips: [{ id: 'q1', routeId: 'Q', times }] });
  for (const p of net.patterns.patterns) p.tripsPerDay = 120;
  return net;
}

function railFolder(name: string, at: { lat: number; lon: number }): string {
  const dir = join(work, name);
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, 'stops.txt'), `stop_id,stop_name,stop_lat,stop_lon,location_type\nQS,Vellmoor Quay,${at.lat},${at.lon},1\n`);
  writeFileSync(
    join(dir, 'calendar.txt'),
    'service_id,monday,tuesday,wednesday,thursday,friday,saturday,sunday,start_date,end_date\nWK,1,1,1,1,1,0,0,20260101,20261231\n',
  );
  return dir;
}

async function audit(context: string[]) {
  const { feed, patterns } = quayRoad();
  const { near, stations } = await contextStops(feed, patterns, context);
  return runAudit(feed, patterns, {
    generatedAt: '2026-10-14T00:00:00Z',
    forceTransfers: false,
    params: { cruise_speed_mps: 11.176, assumed_boardings_per_trip_km: 6 },
    stations: near,
    contextStations: stations,
  });
}

/** East of the gap's first stop and west of its last: where an addition in the gap would be. */
const inGap = (lat: number, lon: number) => {
  const east = (lon - 4.9) * M_PER_DEG_LAT * Math.cos((LAT0 * Math.PI) / 180);
  return east > 750 && east < 2150;
};

describe('context stations as evidence for additions', () => {
  it('lists the gap for review without a context feed', async () => {
    const r = await audit([]);
    expect(r.gaps.find((g) => g.fromStopId === 'm5')?.wide).toBe(true);
    expect(r.candidates.filter((c) => c.action === 'add' && inGap(c.lat, c.lon))).toEqual([]);
    expect(r.reviewGaps.filter((x) => x.fromStopId === 'm5').map((x) => [x.reason, x.detail])).toEqual([
      ['long-straight-empty', '1.4 km straight with no stop of another route within a 400 m walk of its middle'],
    ]);
  });

  it('takes a context station within a walk of the middle as evidence, naming the station', async () => {
    const station = place(1450, 120); // 120 m north of the middle, within the 308 m straight-line reach
    expect(WALK_REACH_M).toBeCloseTo(400 / 1.3, 9);
    const r = await audit([railFolder('vellmoor-rail', station)]);
    // not a gap to review any more; whether a stop there saves riders' time is the model's call (here, on
    // assumed demand that stays within 400 m of today's stops, it does not: no candidate either way)
    expect(r.reviewGaps.filter((x) => x.fromStopId === 'm5')).toEqual([]);
    expect(r.assumptions.some((a) => a.includes('a stop of any route or a station of a context feed within a 400 m walk'))).toBe(true);
    // the rule itself, at the gap's middle: the station is the witness, and the evidence names it
    const { feed, patterns } = quayRoad();
    const { stations } = await contextStops(feed, patterns, [railFolder('vellmoor-rail', station)]);
    const index = buildStopIndex(
      feed,
      patterns.patterns[0].stopIdx.map((s) => [s, 'Q'] as [number, string]),
      stations,
    );
    const mid = place(1450);
    const site = {
      ...mid,
      fromStopIdx: feed.stopIndex.get('m5')!,
      toStopIdx: feed.stopIndex.get('m6')!,
      gapM: 1400,
      scheduledS: 280,
      ownRoutes: new Set(['Q']),
    };
    const d = haversineM(mid.lat, mid.lon, station.lat, station.lon);
    expect(Math.round(d)).toBe(120);
    expect(additionEvidence(feed, index, site)).toEqual({
      ok: true,
      witnessStops: 0,
      witnessRoutes: [],
      witnessStations: ['station Vellmoor Quay (vellmoor-rail), 120 m'],
      text: 'station Vellmoor Quay (vellmoor-rail), 120 m from the site, within a walk',
    });
    // without the stations on the index the same site has no witness
    expect(
      additionEvidence(
        feed,
        buildStopIndex(
          feed,
          patterns.patterns[0].stopIdx.map((s) => [s, 'Q'] as [number, string]),
        ),
        site,
      ).ok,
    ).toBe(false);
  });

  it("counts a station by the gap's end as no evidence for its middle", async () => {
    const r = await audit([railFolder('vellmoor-rail-end', place(800, 60))]);
    expect(r.candidates.filter((c) => c.action === 'add' && inGap(c.lat, c.lon))).toEqual([]);
    expect(r.reviewGaps.filter((x) => x.fromStopId === 'm5').map((x) => x.detail)).toEqual([
      '1.4 km straight with no stop of another route nor station of a context feed within a 400 m walk of its middle',
    ]);
  });
});
