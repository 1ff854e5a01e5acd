// The GIS layers a planner maps the proposals with, from the real audit of the demo feed of Vellmoor:
// candidates.geojson (a removal at its stop, an addition at its site between the two stops it names) and
// stop_points.geojson (one point per stop, with its routes). Checked with turf's validity test and
// great-circle distance (outside references) and against the rows of stops.csv.

import { existsSync } from 'node:fs';
import { booleanValid } from '@turf/boolean-valid';
import { distance } from '@turf/distance';
import { point } from '@turf/helpers';
import { beforeAll, describe, expect, it } from 'vitest';
import { auditFeed } from '../../src/audit/auditFeed.js';
import type { AuditResult } from '../../src/audit/types.js';
import { candidatesGeoJson, stopPointsGeoJson } from '../../src/report/geojson.js';

const FEED = new URL('../../fixtures/demo/demo-feed.zip', import.meta.url).pathname;
const RIDERSHIP = new URL('../../fixtures/demo/ridership.csv', import.meta.url).pathname;
const haveDemo = existsSync(FEED) && existsSync(RIDERSHIP);
if (!haveDemo) console.warn('GIS layer test skipped: fixtures/demo is absent');

describe.skipIf(!haveDemo)('candidates.geojson and stop_points.geojson of the demo feed', () => {
  let result: AuditResult;
  beforeAll(async () => {
    result = (await auditFeed(FEED, { ridership: RIDERSHIP })).result;
  });

  it('has one valid point per candidate; removals at their stop, additions between two consecutive stops of their pattern', () => {
    const fc = candidatesGeoJson(result);
    expect(fc.features.length).toBe(result.candidates.length);
    const adds = fc.features.filter((f) => f.properties.action === 'add');
    const removes = fc.features.filter((f) => f.properties.action === 'remove');
    expect(adds.length).toBeGreaterThan(0);
    expect(removes.length).toBeGreaterThan(0);
    const stopAt = new Map(result.stops.map((s) => [s.stopId, [Number(s.stopLon.toFixed(6)), Number(s.stopLat.toFixed(6))]]));
    for (const f of fc.features) expect(booleanValid(f as never)).toBe(true);
    for (const f of removes) {
      expect(f.geometry.coordinates).toEqual(stopAt.get(String(f.properties.stop_id)));
      expect([f.properties.from_stop_id, f.properties.to_stop_id, f.properties.gap_m]).toEqual(['', '', null]);
    }
    for (const f of adds) {
      const from = String(f.properties.from_stop_id);
      const to = String(f.properties.to_stop_id);
      const gapM = Number(f.properties.gap_m);
      const patterns = String(f.properties.pattern_ids);
      expect(from).not.toBe('');
      expect(to).not.toBe('');
      // the two stops follow each other on the first pattern the addition serves (a stop where riders
      // cannot board or alight may lie between), and the gap is the distance along the path between them
      const rows = result.stops.filter((s) => s.patternId === patterns.split(';')[0]);
      const a = rows.find((s) => s.stopId === from)!;
      const b = rows.find((s) => s.stopId === to)!;
      expect(b.stopIndex, `${from} then ${to}`).toBeGreaterThan(a.stopIndex);
      expect(gapM).toBeCloseTo(b.distAlongM - a.distAlongM, 0);
      // and the site lies between them: no farther from either than the gap along the path
      // (great-circle distance by turf, haversine on a 6 371.0088 km sphere [common practice])
      const site = point(f.geometry.coordinates);
      for (const end of [from, to]) expect(distance(site, point(stopAt.get(end)!), { units: 'meters' })).toBeLessThanOrEqual(gapM + 1);
      expect(gapM).toBeGreaterThan(0);
    }
  });

  it('has one point per stop served in stops.csv, at its position, with every route and pattern that serves it', () => {
    const fc = stopPointsGeoJson(result);
    // a row passed without service (stop_verdict timing-only: the demo's Eastfield Industrial Estate) serves no one
    const served = result.stops.filter((s) => s.stopVerdict !== 'timing-only');
    expect(served.length).toBeLessThan(result.stops.length);
    const ids = new Set(served.map((s) => s.stopId));
    expect(fc.features.length).toBe(ids.size);
    expect(fc.features.length).toBeLessThan(result.stops.length); // the demo's shared stops appear once
    expect(new Set(fc.features.map((f) => f.properties.stop_id)).size).toBe(ids.size);
    for (const f of fc.features) {
      expect(booleanValid(f as never)).toBe(true);
      const rows = served.filter((s) => s.stopId === f.properties.stop_id);
      expect(f.geometry.coordinates).toEqual([Number(rows[0].stopLon.toFixed(6)), Number(rows[0].stopLat.toFixed(6))]);
      expect(f.properties.route_ids).toBe([...new Set(rows.map((s) => s.routeId))].sort().join(';'));
      expect(f.properties.patterns).toBe(new Set(rows.map((s) => s.patternId)).size);
      expect(f.properties.close_on_patterns).toBe(rows.filter((s) => s.verdict === 'close').length);
      const removal = result.candidates.find((c) => c.action === 'remove' && c.stopId === f.properties.stop_id);
      expect(f.properties.removal_rank).toBe(removal ? removal.rank : null);
    }
  });
});
