// GeoJSON renderers (RFC 7946) for GIS users: patterns as LineStrings drawn from their path, stops as
// Points, each carrying the columns of patterns.csv or stops.csv (taken from their column tables, so the
// two stay the same, as the output contract says). Positions are [longitude, latitude] (section 3.1.1),
// rounded to 6 decimals (about 0.1 m), WGS84 implied, so no "crs" member (section 4).

import type { AuditResult, StopResult } from '../audit/types.js';
import { formatNumber, PATTERN_COLUMNS, STOP_COLUMNS, type CsvColumn } from './csv.js';

export type Position = [number, number];

export interface Feature<G> {
  type: 'Feature';
  geometry: G;
  properties: Record<string, string | number | boolean | null>;
}

export interface FeatureCollection<G> {
  type: 'FeatureCollection';
  features: Feature<G>[];
}

export interface LineString {
  type: 'LineString';
  coordinates: Position[];
}

export interface Point {
  type: 'Point';
  coordinates: Position;
}

const round6 = (v: number): number => {
  const r = Math.round(v * 1e6) / 1e6;
  return Object.is(r, -0) ? 0 : r;
};

function validPosition(lon: number, lat: number): boolean {
  return Number.isFinite(lon) && Number.isFinite(lat) && lon >= -180 && lon <= 180 && lat >= -90 && lat <= 90;
}

/** Rounds positions, drops invalid ones and repeats of the previous position. */
function cleanLine(points: readonly Position[]): Position[] {
  const out: Position[] = [];
  for (const [lon, lat] of points) {
    if (!validPosition(lon, lat)) continue;
    const p: Position = [round6(lon), round6(lat)];
    const last = out[out.length - 1];
    if (last && last[0] === p[0] && last[1] === p[1]) continue;
    out.push(p);
  }
  return out;
}

type Properties = Feature<unknown>['properties'];

/**
 * A feature's properties: the columns of the matching CSV file, under the same names and with the same
 * rounding, as JSON values (text raw: GIS tools do not run formulas; a blank number is null).
 */
function propertiesOf<T>(columns: readonly CsvColumn<T>[], row: T, skip: ReadonlySet<string> = new Set()): Properties {
  const out: Properties = {};
  for (const c of columns) {
    if (skip.has(c.name)) continue;
    const v = c.get(row);
    if (c.kind === 'text') out[c.name] = v === null || v === undefined ? '' : String(v);
    else if (typeof v === 'number') {
      const text = formatNumber(v, c.digits);
      out[c.name] = text === '' ? null : Number(text);
    } else out[c.name] = v === undefined ? null : v;
  }
  return out;
}

// a stop's position is the geometry; the verdict's reason and the timepoint flag are for the map's legend
const STOP_POSITION = new Set(['stop_lat', 'stop_lon']);

function stopProperties(s: StopResult): Properties {
  return { ...propertiesOf(STOP_COLUMNS, s, STOP_POSITION), fixed_reason: s.fixedReason, timepoint: s.timepoint };
}

/**
 * patterns.geojson: one LineString per pattern. The path is the pattern's shape; without one (fewer
 * than two positions) the line joins its stops in order. A pattern with fewer than two distinct
 * positions cannot be a LineString (RFC 7946 section 3.1.4) and is left out.
 */
export function patternsGeoJson(result: AuditResult): FeatureCollection<LineString> {
  const stopsByPattern = new Map<string, StopResult[]>();
  for (const s of result.stops) {
    let list = stopsByPattern.get(s.patternId);
    if (!list) stopsByPattern.set(s.patternId, (list = []));
    list.push(s);
  }
  const features: Feature<LineString>[] = [];
  for (const p of result.patterns) {
    let line = cleanLine(p.path);
    if (line.length < 2) {
      const stops = (stopsByPattern.get(p.patternId) ?? []).slice().sort((a, b) => a.stopIndex - b.stopIndex);
      line = cleanLine(stops.map((s) => [s.stopLon, s.stopLat] as Position));
    }
    if (line.length < 2) continue;
    features.push({ type: 'Feature', geometry: { type: 'LineString', coordinates: line }, properties: propertiesOf(PATTERN_COLUMNS, p) });
  }
  return { type: 'FeatureCollection', features };
}

/** stops.geojson: one Point per stop of each pattern (the rows of stops.csv); invalid coordinates are left out. */
export function stopsGeoJson(result: AuditResult): FeatureCollection<Point> {
  const features: Feature<Point>[] = [];
  for (const s of result.stops) {
    if (!validPosition(s.stopLon, s.stopLat)) continue;
    features.push({
      type: 'Feature',
      geometry: { type: 'Point', coordinates: [round6(s.stopLon), round6(s.stopLat)] },
      properties: stopProperties(s),
    });
  }
  return { type: 'FeatureCollection', features };
}
