// The kinds of feed-quality finding as one exhaustive table (title, explanation, default severity), and
// the thresholds the checks use, with their defaults. The CLI's help, the JSON output and the README all
// draw on this table, so a new kind without its text fails to compile.

import { StopspanError } from '../common/errors.js';
import { speedFamily, type SpeedFamily } from '../gtfs/routeTypes.js';

export { speedFamily, type SpeedFamily };

export type Severity = 'error' | 'warning' | 'info';

export const SEVERITY_RANK: Record<Severity, number> = { info: 0, warning: 1, error: 2 };

export type FindingCode =
  | 'twin-stops'
  | 'stop-off-path'
  | 'pathless-trip'
  | 'distance-backtrack'
  | 'time-backtrack'
  | 'implausible-speed'
  | 'coordinate-fault'
  | 'service-ending-soon'
  | 'service-ended'
  | 'no-service'
  | 'dangling-reference';

export interface FindingKind {
  title: string;
  explanation: string; // one line for people
  severity: Severity; // default severity
}

export const FINDINGS: Record<FindingCode, FindingKind> = {
  'twin-stops': {
    title: 'Twin stops',
    explanation: 'Consecutive stops of a pattern lie closer together than the twin-stop threshold; usually a duplicated stop.',
    severity: 'warning',
  },
  'stop-off-path': {
    title: 'Stop off its path',
    explanation: "A stop lies farther from its pattern's shape than the off-path threshold; the stop or the shape is misplaced.",
    severity: 'warning',
  },
  'pathless-trip': {
    title: 'Trip without a path',
    explanation: 'A trip has no shape; distances fall back to straight lines between stops and are understated.',
    severity: 'info',
  },
  'distance-backtrack': {
    title: 'Distance runs backwards',
    explanation: 'shape_dist_traveled decreases along a trip or a shape; distances along the path cannot be trusted.',
    severity: 'error',
  },
  'time-backtrack': {
    title: 'Time runs backwards',
    explanation: 'Arrival or departure times decrease along a trip; the schedule is inconsistent.',
    severity: 'error',
  },
  'implausible-speed': {
    title: 'Implausible scheduled speed',
    explanation:
      "The scheduled speed between timed stops is faster or slower than the route type allows, or a pattern's whole run time is shorter than any plausible cruise speed explains once the bus stops and riders board.",
    severity: 'warning',
  },
  'coordinate-fault': {
    title: 'Coordinate fault',
    explanation: "A stop's coordinates are zero, out of range, near a pole, or far away from the rest of the feed.",
    severity: 'error',
  },
  'service-ending-soon': {
    title: 'Service ending soon',
    explanation:
      "The feed's last day of service is less than the required number of days after the run date (GTFS best practice: at least 7, ideally 30).",
    severity: 'error',
  },
  'service-ended': {
    title: 'Service ended',
    explanation: "The feed's last day of service is before the run date (or the calendar has no day at all); the feed is out of date.",
    severity: 'error',
  },
  'no-service': {
    title: 'No service to check',
    explanation: 'No trip runs on the analysis date (the run date or the week after it), so no pattern could be checked.',
    severity: 'error',
  },
  'dangling-reference': {
    title: 'Dangling reference',
    explanation: 'An id points to nothing (parent_station, shape_id, service_id, agency_id, trip_id, or rows the reader dropped).',
    severity: 'warning',
  },
};

export const FINDING_CODES = Object.keys(FINDINGS) as FindingCode[];

export function isFindingCode(s: string): s is FindingCode {
  return Object.prototype.hasOwnProperty.call(FINDINGS, s);
}

export interface SpeedLimitKmh {
  minKmh: number;
  maxKmh: number;
}

export interface CheckThresholds {
  /** Consecutive pattern stops closer than this, straight line, are twins. Default 5 m. */
  twinStopM: number;
  /** A stop farther than this from its pattern's shape is off the path. Default 100 m. */
  offPathM: number;
  /** Scheduled speed between timed stops outside [minKmh, maxKmh] per family is implausible. */
  speedKmh: Record<SpeedFamily, SpeedLimitKmh>;
  /** A stop is an outlier when farther from the median stop position than max(outlierMinKm, outlierFactor x the median such distance). */
  outlierMinKm: number;
  outlierFactor: number;
  /** Too slow is judged only over spans of at least this length, so a short hop with a long dwell is not flagged. Default 200 m. */
  slowMinSpanM: number;
  /** service-ending-soon when the last day of service is fewer than this many days after the run date. Default 7. */
  serviceMinDays: number;
}

// Speed bounds are common practice, chosen here so that ordinary schedules pass and typing errors (a
// minute's slip, a stop in the wrong city) do not: a city bus faster than 100 km/h or slower than walking
// pace between timed stops is a data fault.
export const DEFAULT_THRESHOLDS: CheckThresholds = {
  twinStopM: 5,
  offPathM: 100,
  speedKmh: {
    bus: { minKmh: 3, maxKmh: 100 },
    tram: { minKmh: 3, maxKmh: 90 },
    metro: { minKmh: 5, maxKmh: 130 },
    rail: { minKmh: 5, maxKmh: 320 },
    ferry: { minKmh: 2, maxKmh: 90 },
    cable: { minKmh: 1, maxKmh: 60 },
    other: { minKmh: 1, maxKmh: 1000 },
  },
  outlierMinKm: 100,
  outlierFactor: 10,
  slowMinSpanM: 200,
  serviceMinDays: 7,
};

export interface ThresholdOptions {
  twinStopM?: number;
  offPathM?: number;
  speedKmh?: Partial<Record<SpeedFamily, Partial<SpeedLimitKmh>>>;
  outlierMinKm?: number;
  outlierFactor?: number;
  slowMinSpanM?: number;
  serviceMinDays?: number;
}

/** Fills defaults and validates; a bad value throws bad-option naming the parameter and the value. */
export function normaliseThresholds(options: ThresholdOptions = {}): CheckThresholds {
  const out: CheckThresholds = {
    ...DEFAULT_THRESHOLDS,
    speedKmh: { ...DEFAULT_THRESHOLDS.speedKmh },
  };
  const num = (name: string, v: number | undefined, min: number): number | undefined => {
    if (v === undefined) return undefined;
    if (typeof v !== 'number' || !Number.isFinite(v) || v < min) {
      throw new StopspanError('bad-option', `invalid option ${name}: expected a number >= ${min}, got ${String(v)}`, {
        value: String(v),
      });
    }
    return v;
  };
  out.twinStopM = num('twinStopM', options.twinStopM, 0) ?? out.twinStopM;
  out.offPathM = num('offPathM', options.offPathM, 0) ?? out.offPathM;
  out.outlierMinKm = num('outlierMinKm', options.outlierMinKm, 0) ?? out.outlierMinKm;
  out.outlierFactor = num('outlierFactor', options.outlierFactor, 1) ?? out.outlierFactor;
  out.slowMinSpanM = num('slowMinSpanM', options.slowMinSpanM, 0) ?? out.slowMinSpanM;
  out.serviceMinDays = num('serviceMinDays', options.serviceMinDays, 0) ?? out.serviceMinDays;
  for (const [fam, lim] of Object.entries(options.speedKmh ?? {})) {
    if (!(fam in out.speedKmh)) {
      throw new StopspanError(
        'bad-option',
        `invalid option speedKmh: expected one of ${Object.keys(out.speedKmh).join(', ')}, got ${fam}`,
        {
          value: fam,
        },
      );
    }
    const f = fam as SpeedFamily;
    const minKmh = num(`speedKmh.${f}.minKmh`, lim?.minKmh, 0) ?? out.speedKmh[f].minKmh;
    const maxKmh = num(`speedKmh.${f}.maxKmh`, lim?.maxKmh, 0) ?? out.speedKmh[f].maxKmh;
    if (maxKmh <= minKmh) {
      throw new StopspanError('bad-option', `invalid option speedKmh.${f}: expected maxKmh > minKmh, got ${minKmh}..${maxKmh}`, {
        value: `${minKmh}..${maxKmh}`,
      });
    }
    out.speedKmh[f] = { minKmh, maxKmh };
  }
  return out;
}
