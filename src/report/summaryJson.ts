// summary.json: the run in one small machine-readable document (feed, date, counts, headline figures,
// parameters with their sources, warnings, sensitivity, assumptions, cautions, and what a realtime archive
// said per pattern), snake_case keys,
// documented by schema/summary.schema.json. Built as an object and written with JSON.stringify.

import type { AuditResult } from '../audit/types.js';
import { CAUTIONS } from './cautions.js';
import { snakeKeys } from '../common/snakeKeys.js';
import { candidateColumns, PATTERN_COLUMNS, rowObject, STOP_COLUMNS } from './csv.js';

export const SUMMARY_SCHEMA_VERSION = 1;
export const TOP_CANDIDATES_IN_SUMMARY = 10;

const r1 = (v: number): number => (Number.isFinite(v) ? Math.round(v * 10) / 10 : 0);
const r3 = (v: number): number => (Number.isFinite(v) ? Math.round(v * 1000) / 1000 : 0);
/** Rounded to 1/scale, null kept (not observed). */
const rn = (v: number | null, scale: number): number | null => (v !== null && Number.isFinite(v) ? Math.round(v * scale) / scale : null);

export function summaryObject(result: AuditResult): Record<string, unknown> {
  const stopRows = result.stops.length;
  const h = result.headline;
  const assumed = result.demandSource === 'assumed';
  const parameters: Record<string, { value: number | string | null; source: string; note: string }> = {};
  for (const [name, p] of Object.entries(result.params)) parameters[name] = { value: p.value, source: p.source, note: p.note };
  return {
    schema_version: SUMMARY_SCHEMA_VERSION,
    tool: { name: result.tool.name, version: result.tool.version },
    feed: {
      source: result.feed.source,
      content_hash: result.feed.contentHash,
      version: result.feed.version,
      publisher: result.feed.publisher,
    },
    date: result.date,
    generated_at: result.generatedAt,
    demand_source: result.demandSource,
    lost_time_source: result.lostTimeSource,
    counts: {
      patterns: h.patterns,
      stops: h.stops,
      trips: h.trips,
      stop_rows: stopRows,
      gaps: result.gaps.length,
      candidates: result.candidates.length,
      review_gaps: result.reviewGaps.length,
      warnings: result.warnings.length,
    },
    headline: {
      median_gap_m: r1(h.medianGapM),
      mean_optimal_spacing_m: r1(h.meanOptimalSpacingM),
      close_stops: h.closeStops,
      wide_gaps: h.wideGaps,
      wide_gaps_on_patterns: h.wideGapsOnPatterns,
      pax_min_lost_per_day: r1(h.paxMinLostPerDay),
      pax_min_additions_per_day: r1(h.paxMinAdditionsPerDay),
      pax_min_at_stake_per_day: r1(h.paxMinAtStakePerDay),
      pax_min_from_assumed_demand: assumed || result.demandSource === 'land-use',
    },
    top_candidates: result.candidates.slice(0, TOP_CANDIDATES_IN_SUMMARY).map((c) => ({
      rank: c.rank,
      action: c.action,
      stop_id: c.stopId,
      stop_name: c.stopName,
      route_ids: [...c.routeIds],
      net_pax_min_per_day: r1(c.netPaxMinPerDay),
      riders_affected_per_day: r1(c.ridersAffectedPerDay),
      run_time_saved_per_trip_s: r1(c.runTimeSavedPerTripS),
      vehicle_hours_per_day: r3(c.vehicleHoursPerDay),
      robust: c.robust,
      evidence: c.evidence,
    })),
    review_gaps: result.reviewGaps.map((g) => ({
      from_stop_id: g.fromStopId,
      to_stop_id: g.toStopId,
      name: g.name,
      lat: Math.round(g.lat * 1e6) / 1e6,
      lon: Math.round(g.lon * 1e6) / 1e6,
      gap_m: r1(g.gapM),
      route_ids: [...g.routeIds],
      reason: g.reason,
      detail: g.detail,
    })),
    parameters,
    sensitivity: result.sensitivity.map((s) => ({
      label: s.label,
      walk_weight: s.walkWeight,
      band_tolerance: s.bandTolerance,
      mean_optimal_spacing_m: r1(s.meanOptimalSpacingM),
      close_stops: s.closeStops,
      wide_gaps: s.wideGaps,
      pax_min_lost_per_day: r1(s.paxMinLostPerDay),
      candidates_kept: s.candidatesKept,
      programme_net_pax_min_per_day: r1(s.programmeNetPaxMinPerDay),
      programme_still_saving: s.programmeStillSaving,
    })),
    plan: result.plan
      ? {
          file: 'plan.json',
          stops_dropped: result.plan.stopsDropped,
          drops_on_patterns: result.plan.dropsOnPatterns,
          patterns_changed: result.plan.patternsChanged,
          ...(snakeKeys(result.plan.figures) as Record<string, unknown>),
        }
      : null,
    warnings: result.warnings.map((w) => ({ code: w.code, message: w.message, count: w.count, examples: [...w.examples] })),
    assumptions: [...result.assumptions],
    cautions: [...CAUTIONS],
    land_use: landUseSection(result),
    observed: observedSection(result),
  };
}

/** The land-use layer's figures (land_use), or null without a layer. */
function landUseSection(result: AuditResult): Record<string, unknown> | null {
  return result.landUse
    ? {
        file: result.landUse.file,
        format: result.landUse.format,
        columns: result.landUse.columns.map((c) => ({ name: c.name, weight: c.weight, total: r1(c.total), covered: r1(c.covered) })),
        features: result.landUse.features,
        features_outside_catchments: result.landUse.featuresOutsideCatchments,
        points: result.landUse.points,
        people: r1(result.landUse.people),
        people_covered: r1(result.landUse.peopleCovered),
        walk_radius_m: result.landUse.walkRadiusM,
        walk_detour: result.landUse.walkDetour,
      }
    : null;
}

/** What a realtime archive said (observed), per pattern where it covered one; null without an archive. */
function observedSection(result: AuditResult): Record<string, unknown> | null {
  return result.observed
    ? {
        source: result.observed.source,
        snapshots_read: result.observed.snapshotsRead,
        snapshots_skipped: result.observed.snapshotsSkipped,
        trips_matched: result.observed.tripsMatched,
        trips_unmatched: result.observed.tripsUnmatched,
        patterns: result.patterns.flatMap((p) => {
          const o = p.observed;
          if (!o) return [];
          return [
            {
              pattern_id: p.patternId,
              trips_observed: o.tripsObserved,
              dwell_s: rn(o.dwellS, 10),
              door_time_s: rn(o.doorTimeS, 10),
              stop_loss_s: rn(o.stopLossS, 100),
              cruise_speed_mps: rn(o.cruiseSpeedMps, 100),
              stop_share: rn(o.stopShare, 1000),
              lost_time_observed_parts: [...o.lostTimeParts],
            },
          ];
        }),
      }
    : null;
}

/** The text of summary.json (two-space indentation, final newline). */
export function summaryJson(result: AuditResult): string {
  return JSON.stringify(summaryObject(result), null, 2) + '\n';
}

/** The rows audit --json=full adds to summary.json, each with the columns of its CSV file (metres). */
export function fullRows(result: AuditResult): { patterns: object[]; stops: object[]; candidates: object[] } {
  const candidateCols = candidateColumns(result.demandSource);
  return {
    patterns: result.patterns.map((p) => rowObject(PATTERN_COLUMNS, p)),
    stops: result.stops.map((s) => rowObject(STOP_COLUMNS, s)),
    candidates: result.candidates.map((c) => rowObject(candidateCols, c)),
  };
}

/**
 * audit --json=full: summary.json and, after it, every row of patterns.csv, stops.csv and candidates.csv
 * as objects under `patterns`, `stops` and `candidates` (the CSV column names and rounding, a blank number
 * null), so a script reads the whole audit from one document.
 */
export function fullJson(result: AuditResult): string {
  return JSON.stringify({ ...summaryObject(result), ...fullRows(result) }, null, 2) + '\n';
}
