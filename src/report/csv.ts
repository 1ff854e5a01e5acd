// CSV renderers for patterns.csv, stops.csv and candidates.csv (column names per DESIGN.md section 5).
// RFC 4180: a header row, fields quoted when they hold a comma, quote, CR or LF, quotes doubled, records
// ended by CRLF (the RFC's line break; every spreadsheet and csv-parse read it), UTF-8 without a BOM so
// the first column name stays exactly "pattern_id". Text cells beginning with =, +, -, @, tab or CR are
// prefixed with a single quote so a spreadsheet shows them instead of running them as formulas; numeric
// cells are never guarded, so a negative number stays a number.

import type { AuditResult, Candidate, PatternResult, StopResult } from '../audit/types.js';
import { checkUnits, metresToFeet, type Units } from './units.js';

export interface CsvOptions {
  units?: Units; // 'imperial' appends *_ft columns after the contract columns; metres are always present
}

type Cell = string | number | boolean | null;

export interface CsvColumn<T> {
  name: string;
  kind: 'text' | 'number';
  digits?: number; // decimals for numbers; integers print as they are
  get: (row: T) => Cell;
}

export const CSV_EOL = '\r\n';

const GUARDED_START = /^[=+\-@\t\r]/;

/** Guards a text cell against spreadsheet formula injection. */
export function guardText(s: string): string {
  return GUARDED_START.test(s) ? `'${s}` : s;
}

/** Quotes a field when RFC 4180 requires it. */
export function quoteField(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

const POW10 = [1, 10, 100, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9];

/**
 * The number a cell holds: v to at most `digits` decimals, rounded as toFixed rounds, -0 as 0; null when
 * not finite. Most cells take a short cut with the same result: when v·10^digits is below 2^31 and not
 * within 1e-6 of a half, rounding the product gives toFixed's integer n (the product's error is far below
 * that margin), and n / 10^digits, one correctly rounded division of exact values, is the number nearest
 * n·10^-digits, which is what parsing toFixed's text gives.
 */
export function cellNumber(v: number, digits: number | undefined): number | null {
  if (!Number.isFinite(v)) return null;
  // an integer is what toFixed and back would give (most cells are counts)
  if (digits === undefined || Number.isInteger(v)) return Object.is(v, -0) ? 0 : v;
  if (digits < POW10.length) {
    const p = POW10[digits];
    const x = v * p;
    const n = Math.round(x);
    if (Math.abs(x) < 2147483648 && Math.abs(Math.abs(x - n) - 0.5) > 1e-6) return n === 0 ? 0 : n / p;
  }
  const r = Number(v.toFixed(digits));
  return Object.is(r, -0) ? 0 : r;
}

/** A number cell's text: cellNumber printed as String prints it, '' when not finite. */
export function formatNumber(v: number, digits: number | undefined): string {
  const x = cellNumber(v, digits);
  return x === null ? '' : String(x);
}

function renderCell<T>(col: CsvColumn<T>, row: T): string {
  const v = col.get(row);
  if (v === null || v === undefined) return '';
  if (col.kind === 'number') {
    if (typeof v === 'boolean') return v ? '1' : '0';
    if (typeof v !== 'number') throw new TypeError(`column ${col.name}: expected a number, got ${typeof v}`);
    return formatNumber(v, col.digits);
  }
  return quoteField(guardText(String(v)));
}

/** Renders rows with the given columns as an RFC 4180 document. */
export function renderCsv<T>(columns: CsvColumn<T>[], rows: readonly T[]): string {
  const out: string[] = [columns.map((c) => quoteField(c.name)).join(',')];
  for (const row of rows) out.push(columns.map((c) => renderCell(c, row)).join(','));
  return out.join(CSV_EOL) + CSV_EOL;
}

/**
 * A row as a JSON object with the CSV file's column names: numbers rounded as the cell is (null where the
 * cell is blank), a boolean number column as 0 or 1, text raw (a JSON reader runs no formulas, so no guard).
 */
export function rowObject<T>(columns: readonly CsvColumn<T>[], row: T): Record<string, string | number | null> {
  const out: Record<string, string | number | null> = {};
  for (const col of columns) {
    const v = col.get(row);
    if (col.kind === 'number')
      out[col.name] = typeof v === 'number' ? cellNumber(v, col.digits) : typeof v === 'boolean' ? Number(v) : null;
    else out[col.name] = v === null || v === undefined ? '' : String(v);
  }
  return out;
}

const text = <T>(name: string, get: (r: T) => Cell): CsvColumn<T> => ({ name, kind: 'text', get });
const num = <T>(name: string, get: (r: T) => Cell, digits?: number): CsvColumn<T> => ({ name, kind: 'number', get, digits });
const feet = (m: number | null): number | null => (m === null ? null : metresToFeet(m));

/** Appends an *_ft column after the contract columns for each *_m column, when imperial. */
function withImperial<T>(columns: CsvColumn<T>[], units: Units): CsvColumn<T>[] {
  if (units === 'metric') return columns;
  const extra = columns
    .filter((c) => c.kind === 'number' && c.name.endsWith('_m'))
    .map((c) => num<T>(c.name.slice(0, -2) + '_ft', (r) => feet(c.get(r) as number | null), 0));
  return [...columns, ...extra];
}

export const PATTERN_COLUMNS: CsvColumn<PatternResult>[] = [
  text('pattern_id', (p) => p.patternId),
  text('route_id', (p) => p.routeId),
  text('route_short_name', (p) => p.routeShortName),
  num('direction_id', (p) => p.directionId),
  text('headsign', (p) => p.headsign),
  text('shape_id', (p) => p.shapeId),
  text('distance_source', (p) => p.distanceSource),
  num('stop_count', (p) => p.stopCount),
  num('length_m', (p) => p.lengthM, 1),
  num('trips_per_day', (p) => p.tripsPerDay, 1),
  num('median_gap_m', (p) => p.medianGapM, 1),
  num('mean_gap_m', (p) => p.meanGapM, 1),
  num('optimal_spacing_m', (p) => p.optimalSpacingM, 1),
  num('band_low_m', (p) => p.bandLowM, 1),
  num('band_high_m', (p) => p.bandHighM, 1),
  num('close_stops', (p) => p.closeStops),
  num('wide_gaps', (p) => p.wideGaps),
  num('optimal_stop_count', (p) => p.optimalStopCount),
  num('pax_min_lost_per_day', (p) => p.paxMinLostPerDay, 1),
  text('demand_source', (p) => p.demandSource),
  num('lost_time_per_stop_s', (p) => p.lostTimePerStopS, 2),
  text('lost_time_source', (p) => p.lostTimeSource),
  num('cruise_speed_mps', (p) => p.cruiseSpeedMps, 2),
  text('cruise_speed_source', (p) => p.cruiseSpeedSource),
  num('traffic_delay_s', (p) => p.trafficDelayS, 1),
  text('stopping_model', (p) => p.stoppingModel),
  num('mean_trip_length_m', (p) => p.meanTripLengthM, 1),
  // what a realtime archive said about the pattern (empty without one), whether or not a set value won
  num('observed_trips', (p) => p.observed?.tripsObserved ?? null),
  num('observed_dwell_s', (p) => p.observed?.dwellS ?? null, 1),
  num('observed_door_time_s', (p) => p.observed?.doorTimeS ?? null, 1),
  num('observed_stop_loss_s', (p) => p.observed?.stopLossS ?? null, 2),
  num('observed_cruise_speed_mps', (p) => p.observed?.cruiseSpeedMps ?? null, 2),
  num('observed_stop_share', (p) => p.observed?.stopShare ?? null, 3),
  text('lost_time_observed_parts', (p) => p.observed?.lostTimeParts.join('+') ?? ''),
  // appended last: what the proposed additions save here (pax_min_lost_per_day is the removals' side), and both
  num('pax_min_additions_per_day', (p) => p.paxMinAdditionsPerDay, 1),
  num('pax_min_at_stake_per_day', (p) => p.paxMinAtStakePerDay, 1),
  // with a land-use layer: people (as weighted) within a walk of a stop of the pattern; empty without one
  num('people_covered', (p) => p.peopleCovered ?? null, 1),
];

export const STOP_COLUMNS: CsvColumn<StopResult>[] = [
  text('pattern_id', (s) => s.patternId),
  text('route_id', (s) => s.routeId),
  num('direction_id', (s) => s.directionId),
  num('stop_index', (s) => s.stopIndex),
  text('stop_id', (s) => s.stopId),
  text('stop_name', (s) => s.stopName),
  num('stop_lat', (s) => s.stopLat, 6),
  num('stop_lon', (s) => s.stopLon, 6),
  num('dist_along_m', (s) => s.distAlongM, 1),
  num('gap_before_m', (s) => s.gapBeforeM, 1),
  num('gap_after_m', (s) => s.gapAfterM, 1),
  num('trips_per_day', (s) => s.tripsPerDay, 1),
  num('boardings_per_day', (s) => s.boardingsPerDay, 1),
  num('alightings_per_day', (s) => s.alightingsPerDay, 1),
  text('verdict', (s) => s.verdict),
  text('fixed_reason', (s) => s.fixedReason),
  text('fixed_note', (s) => s.fixedNote),
  num('removal_net_pax_min_per_day', (s) => s.removalNetPaxMinPerDay, 1),
  text('demand_source', (s) => s.demandSource),
  // appended last so readers of the earlier columns by position are unaffected
  text('optimiser_keeps', (s) => (s.keptByOptimiser ? 'yes' : 'no')),
  // the stop's own verdict and the gaps' beside it, apart (verdict above gives a wide gap's label to its stops)
  text('stop_verdict', (s) => s.stopVerdict),
  text('gap_before_verdict', (s) => s.gapBeforeVerdict ?? ''),
  text('gap_after_verdict', (s) => s.gapAfterVerdict ?? ''),
];

/** candidates.csv: the ranked network-level list; demand_source is the run's (candidates sum over patterns). */
export function candidateColumns(demandSource: string): CsvColumn<Candidate>[] {
  return [
    num('rank', (c) => c.rank),
    text('action', (c) => c.action),
    text('stop_id', (c) => c.stopId),
    text('stop_name', (c) => c.stopName),
    num('stop_lat', (c) => c.lat, 6),
    num('stop_lon', (c) => c.lon, 6),
    text('route_ids', (c) => c.routeIds.join(';')),
    text('pattern_ids', (c) => c.patternIds.join(';')),
    num('net_pax_min_per_day', (c) => c.netPaxMinPerDay, 1),
    num('riders_affected_per_day', (c) => c.ridersAffectedPerDay, 1),
    num('walk_added_pax_min_per_day', (c) => c.walkAddedPaxMinPerDay, 1),
    num('ride_saved_pax_min_per_day', (c) => c.rideSavedPaxMinPerDay, 1),
    num('run_time_saved_per_trip_s', (c) => c.runTimeSavedPerTripS, 1),
    num('vehicle_hours_per_day', (c) => c.vehicleHoursPerDay, 3),
    text('robust', (c) => (c.robust ? 'yes' : 'no')),
    text('demand_source', () => demandSource),
    // appended after the first layout: for an addition, the two stops whose gap it fills and that gap
    text('from_stop_id', (c) => c.fromStopId),
    text('to_stop_id', (c) => c.toStopId),
    num('gap_m', (c) => c.gapM, 1),
    text('evidence', (c) => c.evidence),
    // with a land-use layer, for a removal: people within a walk of the stop and of no other stop served
    num('people_left_uncovered', (c) => c.peopleUncovered ?? null, 1),
  ];
}

export function patternsCsv(result: AuditResult, options: CsvOptions = {}): string {
  const { units = 'metric' } = options;
  return renderCsv(withImperial(PATTERN_COLUMNS, checkUnits(units)), result.patterns);
}

export function stopsCsv(result: AuditResult, options: CsvOptions = {}): string {
  const { units = 'metric' } = options;
  return renderCsv(withImperial(STOP_COLUMNS, checkUnits(units)), result.stops);
}

export function candidatesCsv(result: AuditResult, options: CsvOptions = {}): string {
  const { units = 'metric' } = options;
  checkUnits(units); // candidates carry no distances; the option is accepted for symmetry
  return renderCsv(candidateColumns(result.demandSource), result.candidates);
}
