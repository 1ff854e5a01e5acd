// Land use on hand-made Vellmoor corridors: a 1.4 km gap with nobody in it gets no addition (listed for
// review, reason no-people-near) and the same gap with people all along it gets one; a stop with nobody in
// its catchment is a removal that costs no rider a walk; coverage before and after a removal, worked by hand.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { Stop } from '../../src/gtfs/types.js';
import type { Pattern } from '../../src/network/types.js';
import { runAudit } from '../../src/audit/runAudit.js';
import { evaluateScenario } from '../../src/whatif/whatif.js';
import { readLandUse } from '../../src/landuse/readLandUse.js';
import { WALK_REACH_M } from '../../src/model/walkReach.js';
import { assembleFeed, handPattern, routesAtStopOf } from '../helpers/feedObject.js';

const LAT0 = 52.1;
const M_PER_DEG_LAT = 111_320;
const M_PER_DEG_LON = M_PER_DEG_LAT * Math.cos((LAT0 * Math.PI) / 180);
const lat = (northM: number) => LAT0 + northM / M_PER_DEG_LAT;
const lon = (eastM: number) => 4.3 + eastM / M_PER_DEG_LON;
const stopAt = (id: string, eastM: number): Stop => ({
  id,
  code: '',
  name: `Vellmoor ${id}`,
  lat: lat(0),
  lon: lon(eastM),
  locationType: 0,
  parentStation: '',
});

const MAIN_M = [0, 150, 300, 450, 600, 750, 2150, 2300, 2450]; // the gap: 750 -> 2150 m, 1.4 km

const tmp = mkdtempSync(join(tmpdir(), 'stopspan-landuse-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/** A land-use CSV of [east m, north m, population, jobs] rows. */
function layer(name: string, rows: [number, number, number, number][]) {
  const file = join(tmp, `${name}.csv`);
  writeFileSync(
    file,
    ['lat,lon,population,jobs', ...rows.map(([e, n, p, j]) => `${lat(n).toFixed(7)},${lon(e).toFixed(7)},${p},${j}`)].join('\n') + '\n',
  );
  return readLandUse(file);
}

function network() {
  const stops = MAIN_M.map((d, j) => stopAt(`m${j}`, d));
  const main: Pattern = handPattern({
    id: 'M:0:1',
    routeId: 'M',
    tripIds: Array.from({ length: 80 }, (_, k) => `M-${k}`),
    stopIdx: MAIN_M.map((_, j) => j),
    distAlongM: MAIN_M,
    gapRunTimeS: MAIN_M.slice(1).map((x, j) => (x - MAIN_M[j]) / 5),
  });
  const feed = assembleFeed({
    source: 'vellmoor-quay',
    date: '2026-10-14',
    contentHash: '0'.repeat(64),
    routes: [{ id: 'M', agencyId: 'VT', shortName: 'M', longName: 'Quay Road', type: 3 }],
    stops,
    trips: [],
    shapes: [],
    calendar: [],
    feedInfo: { publisherName: 'Vellmoor Transit', version: 'hand-1', startDate: '20260901', endDate: '20261231' },
  });
  return { feed, patterns: { date: '2026-10-14', patterns: [main], routesAtStop: routesAtStopOf([main]) } };
}

const OPTIONS = { generatedAt: '2026-10-14T00:00:00Z', forceTransfers: false, params: { cruise_speed_mps: 11.176 } };

/** People 40 m north of every stop but m2 (so m2's catchment is empty), 300 residents and 100 jobs each. */
const atStops: [number, number, number, number][] = MAIN_M.filter((_, j) => j !== 2).map((d) => [d, 40, 300, 100]);

describe('land use on a corridor with a 1.4 km gap', () => {
  it('proposes no stop in the gap when nobody lives or works in it, and lists it for review', () => {
    const { feed, patterns } = network();
    const result = runAudit(feed, patterns, { ...OPTIONS, landUse: layer('empty-gap', atStops) });
    expect(result.demandSource).toBe('land-use');
    expect(result.candidates.filter((c) => c.action === 'add')).toEqual([]);
    const review = result.reviewGaps.find((g) => g.fromStopId === 'm5' && g.toStopId === 'm6');
    expect(review?.reason).toBe('no-people-near');
    expect(review?.gapM).toBeCloseTo(1400, 0);
  });

  it('proposes a stop in the same gap when people live all along it, naming them as its evidence', () => {
    const { feed, patterns } = network();
    const along: [number, number, number, number][] = [];
    for (let e = 800; e <= 2100; e += 50) along.push([e, 30, 400, 200]);
    const result = runAudit(feed, patterns, { ...OPTIONS, landUse: layer('full-gap', [...atStops, ...along]) });
    const add = result.candidates.find((c) => c.action === 'add' && c.fromStopId === 'm5' && c.toStopId === 'm6');
    expect(add, JSON.stringify(result.reviewGaps)).toBeDefined();
    expect(add!.evidence).toMatch(/people \(land use\)/);
    expect(add!.netPaxMinPerDay).toBeLessThan(0);
    expect(result.reviewGaps.some((g) => g.fromStopId === 'm5')).toBe(false);
  });

  it('removes a stop with nobody in its catchment at no rider walking further', () => {
    const { feed, patterns } = network();
    const result = runAudit(feed, patterns, { ...OPTIONS, landUse: layer('empty-stop', atStops) });
    const stop = result.stops.find((s) => s.stopId === 'm2')!;
    expect(stop.boardingsPerDay + stop.alightingsPerDay).toBe(0);
    expect(stop.demandSource).toBe('land-use');
    const c = result.candidates.find((x) => x.action === 'remove' && x.stopId === 'm2');
    expect(c).toBeDefined();
    expect(c!.ridersAffectedPerDay).toBe(0);
    expect(c!.walkAddedPaxMinPerDay).toBe(0);
    expect(c!.netPaxMinPerDay).toBeLessThan(0); // riders on board save the stop's lost time
    expect(c!.peopleUncovered).toBe(0);
  });

  it('counts coverage before and after a removal as worked by hand', () => {
    // [D] straight-line reach 400 / 1.3 = 307.7 m. P at 280 m north of m7 (2300 m): 280 m from m7,
    // sqrt(150^2 + 280^2) = 317.6 m from m6 and m8, so only m7 covers it. Q at 200 m north of m7:
    // sqrt(150^2 + 200^2) = 250 m from m6, covered either way. R 1 km north of m0: covered by nothing.
    expect(WALK_REACH_M).toBeCloseTo(307.69, 2);
    const { feed, patterns } = network();
    const rows: [number, number, number, number][] = [...atStops, [2300, 280, 70, 30], [2300, 200, 25, 15], [0, 1000, 500, 0]];
    const landUse = layer('coverage', rows);
    const result = runAudit(feed, patterns, { ...OPTIONS, landUse });
    const all = 8 * 400 + 100 + 40 + 500;
    const covered = 8 * 400 + 100 + 40;
    expect(result.landUse!.people).toBeCloseTo(all, 6);
    expect(result.landUse!.peopleCovered).toBeCloseTo(covered, 6);
    expect(result.landUse!.featuresOutsideCatchments).toBe(1);
    expect(result.patterns[0].peopleCovered).toBeCloseTo(covered, 6);
    const whatif = evaluateScenario(feed, patterns, { remove: ['m7'] }, { ...OPTIONS, landUse });
    expect(whatif.landUse!.peopleCoveredBefore).toBeCloseTo(covered, 6);
    // m7's own 400 people (40 m north of it) are 155 m from m6: still covered; P's 100 are not
    expect(whatif.landUse!.peopleCoveredAfter).toBeCloseTo(covered - 100, 6);
    expect(whatif.landUse!.stopsClosed).toEqual(['m7']);
  });
});
