// GeoJSON renderers (RFC 7946) for GIS users: patterns as LineStrings drawn from their path, stops as
// Points, each carrying the columns of patterns.csv or stops.csv, as the output contract says; the
// candidates as Points (a removal at its stop, an addition at its site) with the columns of
// candidates.csv, and one Point per stop (stop_points.geojson) with the routes and patterns serving it. Positions
// are [longitude, latitude] (section 3.1.1), rounded to 6 decimals (about 0.1 m), WGS84 implied, so no
// "crs" member (section 4).

import type { AuditResult, PatternResult, StopResult } from '../audit/types.js';
import { candidateColumns, cellNumber, rowObject } from './csv.js';

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

// The properties are the columns of patterns.csv and stops.csv (csv.ts) under the same names and with
// the same rounding, as JSON values: text raw (GIS tools do not run formulas), a blank number null. They
// are written out as object literals, not built from the CSV column tables: objects of one fixed shape
// serialise about twice as fast (stops.geojson of Manhattan: 50-80 ms against 105-185 ms). A test checks
// every CSV column against them, so the two cannot drift apart.
const r1 = (v: number | null): number | null => (v === null ? null : cellNumber(v, 1));
const r2 = (v: number | null): number | null => (v === null ? null : cellNumber(v, 2));

function patternProperties(p: PatternResult): Feature<LineString>['properties'] {
  return {
    pattern_id: p.patternId,
    route_id: p.routeId,
    route_short_name: p.routeShortName,
    direction_id: p.directionId,
    headsign: p.headsign,
    shape_id: p.shapeId,
    distance_source: p.distanceSource,
    stop_count: p.stopCount,
    length_m: r1(p.lengthM),
    trips_per_day: r1(p.tripsPerDay),
    median_gap_m: r1(p.medianGapM),
    mean_gap_m: r1(p.meanGapM),
    optimal_spacing_m: r1(p.optimalSpacingM),
    band_low_m: r1(p.bandLowM),
    band_high_m: r1(p.bandHighM),
    close_stops: p.closeStops,
    wide_gaps: p.wideGaps,
    optimal_stop_count: p.optimalStopCount,
    pax_min_lost_per_day: r1(p.paxMinLostPerDay),
    demand_source: p.demandSource,
    lost_time_per_stop_s: r2(p.lostTimePerStopS),
    lost_time_source: p.lostTimeSource,
    cruise_speed_mps: r2(p.cruiseSpeedMps),
    cruise_speed_source: p.cruiseSpeedSource,
    traffic_delay_s: r1(p.trafficDelayS),
    stopping_model: p.stoppingModel,
    mean_trip_length_m: r1(p.meanTripLengthM),
    observed_trips: p.observed?.tripsObserved ?? null,
    observed_dwell_s: r1(p.observed?.dwellS ?? null),
    observed_door_time_s: r1(p.observed?.doorTimeS ?? null),
    observed_stop_loss_s: r2(p.observed?.stopLossS ?? null),
    observed_cruise_speed_mps: r2(p.observed?.cruiseSpeedMps ?? null),
    observed_stop_share: p.observed?.stopShare == null ? null : cellNumber(p.observed.stopShare, 3),
    lost_time_observed_parts: p.observed?.lostTimeParts.join('+') ?? '',
    pax_min_additions_per_day: r1(p.paxMinAdditionsPerDay),
    pax_min_at_stake_per_day: r1(p.paxMinAtStakePerDay),
    people_covered: r1(p.peopleCovered ?? null),
  };
}

function stopProperties(s: StopResult): Feature<Point>['properties'] {
  return {
    pattern_id: s.patternId,
    route_id: s.routeId,
    direction_id: s.directionId,
    stop_index: s.stopIndex,
    stop_id: s.stopId,
    stop_name: s.stopName,
    dist_along_m: r1(s.distAlongM),
    gap_before_m: r1(s.gapBeforeM),
    gap_after_m: r1(s.gapAfterM),
    trips_per_day: r1(s.tripsPerDay),
    boardings_per_day: r1(s.boardingsPerDay),
    alightings_per_day: r1(s.alightingsPerDay),
    verdict: s.verdict,
    fixed_reason: s.fixedReason,
    fixed_note: s.fixedNote,
    removal_net_pax_min_per_day: r1(s.removalNetPaxMinPerDay),
    demand_source: s.demandSource,
    optimiser_keeps: s.keptByOptimiser ? 'yes' : 'no',
    stop_verdict: s.stopVerdict,
    gap_before_verdict: s.gapBeforeVerdict ?? '',
    gap_after_verdict: s.gapAfterVerdict ?? '',
    // beyond stops.csv, for a map's legend; a stop's position is the geometry
    timepoint: s.timepoint,
  };
}

/**
 * patterns.geojson: one LineString per pattern. The path is the pattern's shape; without one (fewer
 * than two positions) the line joins its stops in order. A pattern with fewer than two distinct
 * positions cannot be a LineString (RFC 7946 section 3.1.4) and is left out.
 */
export function patternsGeoJson(result: AuditResult): FeatureCollection<LineString> {
  return { type: 'FeatureCollection', features: [...patternFeatures(result)] };
}

/** The features of patterns.geojson one at a time (the GeoPackage writes them without a second whole list). */
export function* patternFeatures(result: AuditResult): Generator<Feature<LineString>> {
  const stopsByPattern = new Map<string, StopResult[]>();
  for (const s of result.stops) {
    let list = stopsByPattern.get(s.patternId);
    if (!list) stopsByPattern.set(s.patternId, (list = []));
    list.push(s);
  }
  for (const p of result.patterns) {
    let line = cleanLine(p.path);
    if (line.length < 2) {
      const stops = (stopsByPattern.get(p.patternId) ?? []).slice().sort((a, b) => a.stopIndex - b.stopIndex);
      line = cleanLine(stops.map((s) => [s.stopLon, s.stopLat] as Position));
    }
    if (line.length < 2) continue;
    yield { type: 'Feature', geometry: { type: 'LineString', coordinates: line }, properties: patternProperties(p) };
  }
}

/** stops.geojson: one Point per stop of each pattern (the rows of stops.csv); invalid coordinates are left out. */
export function stopsGeoJson(result: AuditResult): FeatureCollection<Point> {
  return { type: 'FeatureCollection', features: [...stopFeatures(result)] };
}

/** The features of stops.geojson one at a time. */
export function* stopFeatures(result: AuditResult): Generator<Feature<Point>> {
  for (const s of result.stops) {
    if (!validPosition(s.stopLon, s.stopLat)) continue;
    yield {
      type: 'Feature',
      geometry: { type: 'Point', coordinates: [round6(s.stopLon), round6(s.stopLat)] },
      properties: stopProperties(s),
    };
  }
}

/**
 * candidates.geojson: one Point per row of candidates.csv, a removal at its stop, an addition at the site
 * proposed (with from_stop_id, to_stop_id and gap_m naming the gap it fills). The properties are the CSV
 * columns, same names and rounding, as JSON values (a blank number null); the position is the geometry.
 */
export function candidatesGeoJson(result: AuditResult): FeatureCollection<Point> {
  return { type: 'FeatureCollection', features: [...candidateFeatures(result)] };
}

/** The features of candidates.geojson one at a time. */
export function* candidateFeatures(result: AuditResult): Generator<Feature<Point>> {
  const columns = candidateColumns(result.demandSource).filter((c) => c.name !== 'stop_lat' && c.name !== 'stop_lon');
  for (const c of result.candidates) {
    if (!validPosition(c.lon, c.lat)) continue;
    yield { type: 'Feature', geometry: { type: 'Point', coordinates: [round6(c.lon), round6(c.lat)] }, properties: rowObject(columns, c) };
  }
}

/**
 * stop_points.geojson: one Point per stop served (stops.geojson has one per stop of each pattern), with
 * the routes and patterns that serve it (sorted, joined by ";"), their trips a day summed, on how many of
 * them its spacing is close, why it is fixed (the first pattern's reason, empty when on none), and the rank
 * of its removal in candidates.csv (null when it is not proposed).
 */
export function stopPointsGeoJson(result: AuditResult): FeatureCollection<Point> {
  return { type: 'FeatureCollection', features: [...stopPointFeatures(result)] };
}

/** The features of stop_points.geojson one at a time (the stops are gathered first: a stop's routes come from every pattern). */
export function* stopPointFeatures(result: AuditResult): Generator<Feature<Point>> {
  interface Acc {
    first: StopResult;
    routes: Set<string>;
    patterns: Set<string>;
    trips: number;
    close: number;
    fixedReason: string;
  }
  const byStop = new Map<string, Acc>();
  for (const s of result.stops) {
    if (s.stopVerdict === 'timing-only') continue; // passed without service: not a stop served on that pattern
    let a = byStop.get(s.stopId);
    if (!a) byStop.set(s.stopId, (a = { first: s, routes: new Set(), patterns: new Set(), trips: 0, close: 0, fixedReason: '' }));
    a.routes.add(s.routeId);
    a.patterns.add(s.patternId);
    a.trips += s.tripsPerDay;
    if (s.verdict === 'close') a.close++;
    if (!a.fixedReason && s.fixedReason) a.fixedReason = String(s.fixedReason);
  }
  const removalRank = new Map<string, number>();
  for (const c of result.candidates) if (c.action === 'remove' && !removalRank.has(c.stopId)) removalRank.set(c.stopId, c.rank);
  for (const [stopId, a] of byStop) {
    const s = a.first;
    if (!validPosition(s.stopLon, s.stopLat)) continue;
    yield {
      type: 'Feature',
      geometry: { type: 'Point', coordinates: [round6(s.stopLon), round6(s.stopLat)] },
      properties: {
        stop_id: stopId,
        stop_name: s.stopName,
        route_ids: [...a.routes].sort().join(';'),
        pattern_ids: [...a.patterns].sort().join(';'),
        patterns: a.patterns.size,
        trips_per_day: r1(a.trips),
        close_on_patterns: a.close,
        fixed_reason: a.fixedReason,
        removal_rank: removalRank.get(stopId) ?? null,
      },
    };
  }
}
