// The model's parameters in one normalised structure, by the names of the design notes, each default with
// its source label and a short note, so reports can say where every number came from. Options from the
// CLI, a --params file and a library call all pass through normalizeParams, the one place parameters are
// checked; unknown keys and bad values are refused.

import { parseDecimal } from '../common/decimal.js';
import { readJsonFile } from '../common/readJsonFile.js';
import { StopspanError } from '../common/errors.js';
import type { ParamsReport, SourceLabel } from './types.js';

export type StoppingModel = 'always' | 'poisson' | 'observed';
/** The parameter's values: a model, or auto (chosen per pattern by the data it has). */
export type StoppingModelParam = StoppingModel | 'auto';

export interface ModelParams {
  walk_speed_mps: number;
  walk_weight: number;
  door_time_s: number;
  accel_mps2: number;
  decel_mps2: number;
  reentry_delay_s: number;
  cruise_speed_mps: number | null; // null: estimated per pattern from the schedule
  mean_trip_length_m: number | null; // null: from ridership, else typical for the route type (typicalTripLengthM)
  band_tolerance: number;
  max_gap_m: number;
  stopping_model: StoppingModelParam;
  assumed_boardings_per_trip_km: number;
  operating_cost_per_vehicle_hour: number | null;
  value_of_time_per_hour: number | null;
}

export type ParamName = keyof ModelParams;

/** Normalised parameters plus the names the user set (reported with source "user"). */
export interface NormalizedParams {
  readonly values: Readonly<ModelParams>;
  readonly given: readonly ParamName[];
}

/**
 * Parameters as a library call takes them: any of them by name (the rest at their defaults), or what
 * normalizeParams returned, which is not checked again.
 */
export type ParamsInput = Partial<ModelParams> | NormalizedParams;

/** What normalizeParams returned (frozen): passed through as it is when it comes back. */
const CHECKED = new WeakSet<object>();

interface ParamSpec {
  default: number | string | null;
  source: SourceLabel;
  note: string;
  kind: 'positive' | 'nonnegative' | 'fraction' | 'stopping' | 'positive-or-null' | 'nonnegative-or-null';
}

/** Every parameter with its default, source label and note. The one table docs and reports draw on. */
export const PARAM_SPECS: Record<ParamName, ParamSpec> = {
  walk_speed_mps: {
    default: 1.2,
    source: 'M',
    kind: 'positive',
    note: 'common practice: pedestrian design speed of about 1.2 m/s (4 ft/s); value from memory',
  },
  walk_weight: {
    default: 2,
    source: 'M',
    kind: 'positive',
    note: 'common practice: riders weigh walking about twice in-vehicle time; value from memory',
  },
  door_time_s: {
    default: 5,
    source: 'C',
    kind: 'nonnegative',
    note: 'fixed part of dwell, 5 s (Levinson 1983, TRR 915); door opening and closing alone is 2-5 s (TCQSM, from memory)',
  },
  accel_mps2: { default: 1.22, source: 'S', kind: 'positive', note: '4.0 ft/s2, HCM 2010 transit delay expression, via the design notes' },
  decel_mps2: { default: 1.22, source: 'S', kind: 'positive', note: '4.0 ft/s2, HCM 2010 transit delay expression, via the design notes' },
  reentry_delay_s: { default: 2, source: 'M', kind: 'nonnegative', note: 'assumption: wait to re-enter traffic, chosen within 0-3 s' },
  cruise_speed_mps: {
    default: null,
    source: 'estimated',
    kind: 'positive-or-null',
    note: 'estimated per pattern: the slowest cruise that keeps to the schedule, or the typical speed of the route type (bus 25 mph, from memory) when the schedule is slower, the rest taken as traffic delay',
  },
  mean_trip_length_m: {
    default: null,
    source: 'M',
    kind: 'positive-or-null',
    note: "mean in-vehicle trip: from the ridership load profile, else typical for the route type (city bus 2 mi, 3.2 km, from memory; other modes US national passenger-miles over unlinked trips), trip lengths exponential, truncated by the pattern's ends",
  },
  band_tolerance: {
    default: 0.05,
    source: 'D',
    kind: 'fraction',
    note: 'design choice: spacings costing riders at most 5 % more than the optimum count as near-optimal',
  },
  max_gap_m: {
    default: 800,
    source: 'M',
    kind: 'positive',
    note: 'common practice walking policy (about half a mile between stops); from memory',
  },
  stopping_model: {
    default: 'auto',
    source: 'D',
    kind: 'stopping',
    note: 'auto: observed stop shares where realtime data covers a pattern, Poisson P = 1 - exp(-lambda) where demand comes from a ridership file, always (every stop served) where demand is assumed, since a chance of skipping a stop is only as good as the counts behind it',
  },
  assumed_boardings_per_trip_km: {
    default: 3,
    source: 'M',
    kind: 'positive',
    note: 'assumption used only without a ridership file: boardings per trip per km of pattern; it scales the passenger-minutes, and moves the optimum only when stopping_model=poisson is set',
  },
  operating_cost_per_vehicle_hour: {
    default: null,
    source: 'D',
    kind: 'nonnegative-or-null',
    note: 'not set: operating cost left out of the optimiser',
  },
  value_of_time_per_hour: {
    default: null,
    source: 'D',
    kind: 'positive-or-null',
    note: "not set: needed with operating_cost_per_vehicle_hour to weigh it against riders' time",
  },
};

export const PARAM_NAMES: readonly ParamName[] = Object.freeze(Object.keys(PARAM_SPECS) as ParamName[]);

/** The defaults, as a fresh object. */
export function defaultParams(): ModelParams {
  const out: Record<string, unknown> = {};
  for (const name of PARAM_NAMES) out[name] = PARAM_SPECS[name].default;
  return out as unknown as ModelParams;
}

function bad(name: string, expected: string, got: unknown, file?: string): StopspanError {
  const shown = typeof got === 'string' ? JSON.stringify(got) : String(JSON.stringify(got) ?? got);
  // the message names the parameter and the value already: the context adds only the file
  return new StopspanError('bad-option', `invalid parameter ${name}: expected ${expected}, got ${shown}`, { file });
}

function check(name: ParamName, raw: unknown, file?: string): number | string | null {
  const spec = PARAM_SPECS[name];
  // numbers may come from the command line as strings
  const num = typeof raw === 'string' ? (parseDecimal(raw) ?? raw) : raw;
  switch (spec.kind) {
    case 'stopping':
      if (raw === 'auto' || raw === 'always' || raw === 'poisson' || raw === 'observed') return raw;
      throw bad(name, '"auto", "always", "poisson" or "observed"', raw, file);
    case 'positive':
      if (typeof num === 'number' && Number.isFinite(num) && num > 0) return num;
      throw bad(name, 'a number above 0', raw, file);
    case 'nonnegative':
      if (typeof num === 'number' && Number.isFinite(num) && num >= 0) return num;
      throw bad(name, 'a number of 0 or more', raw, file);
    case 'fraction':
      if (typeof num === 'number' && Number.isFinite(num) && num > 0 && num < 1) return num;
      throw bad(name, 'a number between 0 and 1 (0.05 means 5 %)', raw, file);
    case 'positive-or-null':
      if (raw === null) return null;
      if (typeof num === 'number' && Number.isFinite(num) && num > 0) return num;
      throw bad(name, 'a number above 0 or null', raw, file);
    case 'nonnegative-or-null':
      if (raw === null) return null;
      if (typeof num === 'number' && Number.isFinite(num) && num >= 0) return num;
      throw bad(name, 'a number of 0 or more, or null', raw, file);
  }
}

/**
 * Checks and completes a parameter object (from a --params file, CLI options, or code). Every key is
 * optional; unknown keys and bad values throw StopspanError 'bad-option' naming the parameter. What this
 * returned, given again, comes back as it is.
 */
export function normalizeParams(input: unknown, { file }: { file?: string } = {}): NormalizedParams {
  if (typeof input === 'object' && input !== null && CHECKED.has(input)) return input as NormalizedParams;
  if (input === undefined || input === null) return checked(defaultParams(), []);
  if (typeof input !== 'object' || Array.isArray(input)) {
    throw new StopspanError(
      'bad-option',
      `invalid parameters: expected an object of named values, got ${Array.isArray(input) ? 'an array' : typeof input}`,
      { file },
    );
  }
  const values = defaultParams() as unknown as Record<string, unknown>;
  const given: ParamName[] = [];
  for (const [key, raw] of Object.entries(input as Record<string, unknown>)) {
    if (!(key in PARAM_SPECS)) {
      throw new StopspanError('bad-option', `invalid parameter ${key}: expected one of ${PARAM_NAMES.join(', ')}, got an unknown name`, {
        file,
        column: key,
        value: key,
      });
    }
    if (raw === undefined) continue;
    values[key] = check(key as ParamName, raw, file);
    given.push(key as ParamName);
  }
  const v = values as unknown as ModelParams;
  if (v.operating_cost_per_vehicle_hour !== null && v.value_of_time_per_hour === null) {
    throw bad('value_of_time_per_hour', 'a number above 0 when operating_cost_per_vehicle_hour is set', null, file);
  }
  return checked(v, given);
}

function checked(values: ModelParams, given: ParamName[]): NormalizedParams {
  const np: NormalizedParams = Object.freeze({ values: Object.freeze(values), given: Object.freeze(given) });
  CHECKED.add(np);
  return np;
}

/** Reads a JSON parameters file and normalises it; a file that is not JSON is a 'bad-option' error. */
export function loadParamsFile(path: string): NormalizedParams {
  return loadParams(path);
}

/**
 * Parameters from a JSON file (when given), then single values on top (command-line options, numbers
 * possibly still as text), checked once together; errors name the file. A file that is not JSON, or not
 * an object of named values, is a 'bad-option' error; one holding null sets nothing.
 */
export function loadParams(path: string | undefined, overrides: Readonly<Record<string, unknown>> = {}): NormalizedParams {
  const fromFile = path ? readJsonFile(path, 'bad-option', 'parameters file') : null;
  const base = fromFile ?? {};
  if (typeof base !== 'object' || Array.isArray(base)) return normalizeParams(base, { file: path });
  return normalizeParams({ ...base, ...overrides }, { file: path });
}

/** The parameters used, each with its value, source label (user when set) and note, for summary.json. */
export function paramsReport(
  params: NormalizedParams,
  overrides: Partial<Record<ParamName, { value: number | string | null; source: SourceLabel; note: string }>> = {},
): ParamsReport {
  const out: ParamsReport = {};
  for (const name of PARAM_NAMES) {
    const spec = PARAM_SPECS[name];
    const userSet = params.given.includes(name);
    out[name] = overrides[name] ?? {
      value: params.values[name],
      source: userSet ? 'user' : spec.source,
      note: userSet ? `set by the user (default ${JSON.stringify(spec.default)}: ${spec.note})` : spec.note,
    };
  }
  return out;
}
