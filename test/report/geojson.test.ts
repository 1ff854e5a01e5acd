// GeoJSON renderers against RFC 7946: FeatureCollection of Features with geometry and properties,
// positions [longitude, latitude] within WGS84 ranges, LineStrings of two or more positions, no "crs"
// member; coordinates equal the input stops; turf's validity check as an outside reference.

import { booleanValid } from '@turf/boolean-valid';
import { describe, expect, it } from 'vitest';
import type { AuditResult } from '../../src/audit/types.js';
import { parse } from 'csv-parse/sync';
import { candidatesCsv, patternsCsv, stopsCsv } from '../../src/report/csv.js';
import { candidatesGeoJson, patternsGeoJson, stopsGeoJson } from '../../src/report/geojson.js';
import { makeSampleResult } from './sampleResult.js';

const sample = makeSampleResult();

function hasKeyDeep(v: unknown, key: string): boolean {
  if (Array.isArray(v)) return v.some((x) => hasKeyDeep(x, key));
  if (v && typeof v === 'object') return Object.entries(v).some(([k, x]) => k === key || hasKeyDeep(x, key));
  return false;
}

function checkPosition(p: unknown): void {
  // RFC 7946 section 3.1.1 [C]: a position is an array of two or more numbers, longitude first, then latitude
  expect(Array.isArray(p)).toBe(true);
  const q = p as number[];
  expect(q.length).toBe(2);
  expect(q[0]).toBeGreaterThanOrEqual(-180);
  expect(q[0]).toBeLessThanOrEqual(180);
  expect(q[1]).toBeGreaterThanOrEqual(-90);
  expect(q[1]).toBeLessThanOrEqual(90);
  // RFC 7946 section 11.2 [C]: six decimal places (about 10 cm) are enough
  for (const v of q) expect(Math.abs(v * 1e6 - Math.round(v * 1e6))).toBeLessThan(1e-6);
}

describe('stops.geojson', () => {
  const fc = stopsGeoJson(sample);
  it('holds one Point per stop row at the stop, longitude first', () => {
    // RFC 7946 section 3.3 [C]: a FeatureCollection has a "features" array of Feature objects
    expect(fc.type).toBe('FeatureCollection');
    expect(fc.features.length).toBe(sample.stops.length);
    fc.features.forEach((f, i) => {
      const s = sample.stops[i];
      // RFC 7946 section 3.2 [C]: a Feature has "geometry" and "properties" members
      expect(f.type).toBe('Feature');
      expect(f.geometry.type).toBe('Point');
      checkPosition(f.geometry.coordinates);
      expect(Math.abs(f.geometry.coordinates[0] - s.stopLon)).toBeLessThanOrEqual(5e-7);
      expect(Math.abs(f.geometry.coordinates[1] - s.stopLat)).toBeLessThanOrEqual(5e-7);
      expect(f.properties.stop_id).toBe(s.stopId);
      expect(f.properties.stop_name).toBe(s.stopName); // raw text: GIS tools do not run formulas
      expect(f.properties.verdict).toBe(s.verdict);
      expect(f.properties.removal_net_pax_min_per_day).toBe(
        s.removalNetPaxMinPerDay === null ? null : Math.round(s.removalNetPaxMinPerDay * 10) / 10,
      );
      expect(f.properties.demand_source).toBe('assumed');
      expect(booleanValid(f as never)).toBe(true);
    });
  });

  it('has no crs member (RFC 7946 section 4: WGS84 is implied)', () => {
    expect(hasKeyDeep(fc, 'crs')).toBe(false);
    expect(hasKeyDeep(patternsGeoJson(sample), 'crs')).toBe(false);
  });

  it('leaves out stops whose coordinates are outside WGS84 ranges', () => {
    const bad: AuditResult = {
      ...sample,
      stops: [{ ...sample.stops[0], stopLat: 91 }, { ...sample.stops[1], stopLon: Number.NaN }, sample.stops[2]],
    };
    const out = stopsGeoJson(bad);
    expect(out.features.map((f) => f.properties.stop_id)).toEqual([sample.stops[2].stopId]);
  });
});

describe('patterns.geojson', () => {
  it('draws each pattern as a LineString of two or more positions along its path', () => {
    const fc = patternsGeoJson(sample);
    expect(fc.features.length).toBe(sample.patterns.length);
    fc.features.forEach((f, i) => {
      const p = sample.patterns[i];
      expect(f.geometry.type).toBe('LineString');
      // RFC 7946 section 3.1.4 [C]: "coordinates" is an array of two or more positions
      expect(f.geometry.coordinates.length).toBeGreaterThanOrEqual(2);
      f.geometry.coordinates.forEach(checkPosition);
      expect(f.geometry.coordinates.length).toBe(p.path.length);
      expect(f.geometry.coordinates[0][0]).toBeCloseTo(p.path[0][0], 6);
      expect(f.geometry.coordinates[0][1]).toBeCloseTo(p.path[0][1], 6);
      expect(f.properties.pattern_id).toBe(p.patternId);
      expect(f.properties.optimal_spacing_m).toBe(Math.round(p.optimalSpacingM * 10) / 10);
      expect(booleanValid(f as never)).toBe(true);
    });
  });

  it('joins the stops in order when a pattern has no path, and leaves out a pattern with one position', () => {
    const p0 = sample.patterns[0];
    const stops0 = sample.stops.filter((s) => s.patternId === p0.patternId);
    const lone = { ...sample.patterns[1], patternId: 'lone', path: [] as [number, number][] };
    const result: AuditResult = {
      ...sample,
      patterns: [{ ...p0, path: [] }, lone],
      stops: [...[...stops0].reverse(), { ...stops0[0], patternId: 'lone' }],
    };
    const fc = patternsGeoJson(result);
    expect(fc.features.length).toBe(1);
    const coords = fc.features[0].geometry.coordinates;
    expect(coords.length).toBe(stops0.length);
    coords.forEach((c, i) => {
      expect(c[0]).toBeCloseTo(stops0[i].stopLon, 6);
      expect(c[1]).toBeCloseTo(stops0[i].stopLat, 6);
    });
  });
});

describe('GeoJSON properties and the CSV files', () => {
  // DESIGN.md section 5: the GeoJSON files carry "the same" as patterns.csv and stops.csv. The CSV text is
  // read back with csv-parse (an outside parser); every column but the stop position (the geometry) must
  // be a property of the same name and value: numbers as numbers, blank as null, text unguarded.
  const unguard = (s: string): string => (/^'[=+\-@\t\r]/.test(s) ? s.slice(1) : s);
  const same = (csvText: string, features: { properties: Record<string, unknown> }[], skip: string[]): void => {
    const rows = parse(csvText, { columns: true }) as Record<string, string>[];
    expect(features.length).toBe(rows.length);
    rows.forEach((row, i) => {
      const props = features[i].properties;
      for (const [name, cell] of Object.entries(row)) {
        if (skip.includes(name)) continue;
        expect(props, name).toHaveProperty(name);
        const v = props[name];
        if (typeof v === 'number') expect(v, name).toBe(Number(cell));
        else if (v === null) expect(cell, name).toBe('');
        else expect(v, name).toBe(unguard(cell));
      }
    });
  };

  it('patterns.geojson has every column of patterns.csv', () => {
    same(patternsCsv(sample), patternsGeoJson(sample).features, []);
  });

  it('stops.geojson has every column of stops.csv but the position, which is its geometry', () => {
    same(stopsCsv(sample), stopsGeoJson(sample).features, ['stop_lat', 'stop_lon']);
  });

  it('candidates.geojson has every column of candidates.csv but the position, which is its geometry', () => {
    expect(sample.candidates.some((c) => c.action === 'add') && sample.candidates.some((c) => c.action === 'remove')).toBe(true);
    same(candidatesCsv(sample), candidatesGeoJson(sample).features, ['stop_lat', 'stop_lon']);
  });
});
