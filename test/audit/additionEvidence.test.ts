// The evidence rule for additions on hand-made Vellmoor corridors: a 1.4 km gap with nobody near its
// middle gets no addition (it is listed for review with its length and reason, and no passenger-minute
// figure); the same gap with another route's stops along it has evidence, which the addition names; the
// same gap scheduled at expressway speed is a fast stretch whatever stands beside it.
import { describe, expect, it } from 'vitest';
import type { Feed, Stop } from '../../src/gtfs/types.js';
import type { Pattern } from '../../src/network/types.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { additionEvidence, buildStopIndex, FAST_STRETCH_MPS, WALK_REACH_M } from '../../src/audit/additionEvidence.js';
import { assembleFeed, handPattern, routesAtStopOf } from '../helpers/feedObject.js';
import { CAUTIONS } from '../../src/audit/cautions.js';

const LAT0 = 52.1;
const M_PER_DEG_LAT = 111_320;
const stopAt = (id: string, eastM: number, northM = 0): Stop => ({
  id,
  code: '',
  name: `Vellmoor ${id}`,
  lat: LAT0 + northM / M_PER_DEG_LAT,
  lon: 4.3 + eastM / (M_PER_DEG_LAT * Math.cos((LAT0 * Math.PI) / 180)),
  locationType: 0,
  parentStation: '',
});

const MAIN_M = [0, 150, 300, 450, 600, 750, 2150, 2300, 2450]; // the gap: 750 -> 2150 m, 1.4 km, middle at 1450 m

/** Route M along Quay Road with a 1.4 km gap; route C's stops at the given east positions, 80 m north of it. */
function corridor(crossEastM: number[], gapSpeedMps = 5) {
  const stops = MAIN_M.map((d, j) => stopAt(`m${j}`, d));
  const cross = crossEastM.map((e, k) => stopAt(`c${k}`, e, 80));
  stops.push(...cross);
  const gapRunTimeS = MAIN_M.slice(1).map((x, j) => (x - MAIN_M[j]) / (j === 5 ? gapSpeedMps : 5));
  const trips = (id: string, n: number) => Array.from({ length: n }, (_, k) => `${id}-${k}`);
  const main: Pattern = handPattern({
    id: 'M:0:1',
    routeId: 'M',
    tripIds: trips('M', 80),
    stopIdx: MAIN_M.map((_, j) => j),
    distAlongM: MAIN_M,
    gapRunTimeS,
  });
  const patterns: Pattern[] = [main];
  if (cross.length >= 2) {
    const idx = cross.map((_, k) => MAIN_M.length + k);
    const along = crossEastM.map((e) => e - crossEastM[0]);
    patterns.push(
      handPattern({
        id: 'C:0:1',
        routeId: 'C',
        tripIds: trips('C', 30),
        stopIdx: idx,
        distAlongM: along,
        gapRunTimeS: along.slice(1).map((x, j) => (x - along[j]) / 5),
      }),
    );
  }
  const routesAtStop = routesAtStopOf(patterns);
  const feed = assembleFeed({
    source: 'vellmoor-quay',
    date: '2026-10-14',
    contentHash: '0'.repeat(64),
    routes: [
      { id: 'M', agencyId: 'VT', shortName: 'M', longName: 'Quay Road', type: 3 },
      { id: 'C', agencyId: 'VT', shortName: 'C', longName: 'Quay Lanes', type: 3 },
    ],
    stops,
    trips: [],
    shapes: [],
    calendar: [],
    feedInfo: { publisherName: 'Vellmoor Transit', version: 'hand-1', startDate: '20260901', endDate: '20261231' },
  });
  return runAudit(
    feed,
    { date: '2026-10-14', patterns, routesAtStop },
    { generatedAt: '2026-10-14T00:00:00Z', forceTransfers: false, params: { cruise_speed_mps: 11.176 } },
  );
}

const inGap = (lat: number, lon: number) => {
  const east = (lon - 4.3) * M_PER_DEG_LAT * Math.cos((LAT0 * Math.PI) / 180);
  return east > 750 && east < 2150 && Math.abs((lat - LAT0) * M_PER_DEG_LAT) < 1;
};

describe('the evidence rule for additions', () => {
  it('proposes no stop in a 1.4 km gap with nobody near its middle, and lists it for review without a figure', () => {
    // a route C far to the west: its stops witness nothing in the gap
    const r = corridor([-900, -700]);
    const gapRow = r.gaps.find((g) => g.fromStopId === 'm5');
    expect(gapRow?.wide).toBe(true);
    expect(r.candidates.filter((c) => c.action === 'add' && inGap(c.lat, c.lon))).toEqual([]);
    const review = r.reviewGaps.filter((x) => x.fromStopId === 'm5');
    expect(review).toHaveLength(1);
    const g = review[0];
    expect([g.fromStopId, g.toStopId, Math.round(g.gapM)]).toEqual(['m5', 'm6', 1400]);
    // a straight run of 1.4 km, no other route near its middle
    expect(g.reason).toBe('long-straight-empty');
    expect(g).not.toHaveProperty('netPaxMinPerDay');
  });

  it('finds evidence for the stop when another route has stops along the gap, and says what it stands on', () => {
    // route C runs beside the gap with stops from 1000 to 1900 m (not near both ends: not a local service of the gap)
    const r = corridor([1000, 1250, 1450, 1650, 1900]);
    // the gap is wide and has evidence: not listed for review; whether a stop saves riders' time is the model's call
    expect(r.gaps.find((g) => g.fromStopId === 'm5')?.wide).toBe(true);
    expect(r.reviewGaps.filter((x) => x.fromStopId === 'm5')).toEqual([]);
    // within the reach (308 m straight line) of the middle at 1450 m: the stops at 1250, 1450 and 1650 m (80 m off the street)
    expect(WALK_REACH_M).toBeCloseTo(400 / 1.3, 6);
    const feed = {
      stops: [stopAt('a', 750), stopAt('b', 2150), ...[1000, 1250, 1450, 1650, 1900].map((e, k) => stopAt(`c${k}`, e, 80))],
    } as unknown as Feed;
    const index = buildStopIndex(feed, [
      [0, 'M'],
      [1, 'M'],
      [2, 'C'],
      [3, 'C'],
      [4, 'C'],
      [5, 'C'],
      [6, 'C'],
    ]);
    const mid = stopAt('mid', 1450);
    const ev = additionEvidence(feed, index, {
      lat: mid.lat,
      lon: mid.lon,
      fromStopIdx: 0,
      toStopIdx: 1,
      gapM: 1400,
      scheduledS: 280,
      ownRoutes: new Set(['M']),
    });
    expect(ev).toEqual({ ok: true, witnessStops: 3, witnessRoutes: ['C'], text: '3 stops of route C within a walk of the site' });
    // the gap's own route's stops witness nothing
    expect(
      additionEvidence(feed, index, {
        lat: mid.lat,
        lon: mid.lon,
        fromStopIdx: 0,
        toStopIdx: 1,
        gapM: 1400,
        scheduledS: 280,
        ownRoutes: new Set(['M', 'C']),
      }).ok,
    ).toBe(false);
  });

  it("counts no stop standing by the gap's ends as evidence for its middle", () => {
    // route C's stops beside the gap's two ends only
    const r = corridor([700, 2200]);
    expect(r.candidates.filter((c) => c.action === 'add' && inGap(c.lat, c.lon))).toEqual([]);
    expect(r.reviewGaps.filter((x) => x.fromStopId === 'm5').map((x) => x.reason)).toEqual(['long-straight-empty']);
  });

  it('lists a gap the schedule runs faster than a local bus as a fast stretch, witnesses or not', () => {
    // 1400 m in 70 s is 72 km/h, above the 50 km/h threshold
    expect(FAST_STRETCH_MPS * 3.6).toBeCloseTo(50, 9);
    const r = corridor([1000, 1250, 1450, 1650, 1900], 20);
    expect(r.candidates.filter((c) => c.action === 'add' && inGap(c.lat, c.lon))).toEqual([]);
    const review = r.reviewGaps.filter((x) => x.fromStopId === 'm5');
    expect(review.map((x) => x.reason)).toEqual(['fast-stretch']);
    expect(review[0].detail).toContain('72 km/h');
  });

  it('cautions the reader about additions beside the removals, and states the rule among the assumptions', () => {
    const r = corridor([1000, 1250, 1450, 1650, 1900]);
    expect(CAUTIONS.filter((c) => c.startsWith('Before any stop is added'))).toEqual([
      'Before any stop is added: a site check that a bus can pull in and stop there safely, and that people can reach it on foot.',
    ]);
    expect(r.assumptions).toContain(CAUTIONS.find((c) => c.startsWith('Before any stop is added')));
    expect(
      r.assumptions.some(
        (a) => a.startsWith('A stop is proposed in a wide gap only with evidence') && a.includes('400 m walk') && a.includes('50 km/h'),
      ),
    ).toBe(true);
  });
});
