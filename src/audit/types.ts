// The audit's result: everything the reports (HTML, CSV, GeoJSON, JSON) draw on. Metres, seconds and
// passengers per day internally; conversion to imperial happens only when rendering.
//
// Sign convention (DESIGN.md section 4): a "net passenger-minutes per day" figure is the CHANGE in riders'
// total time that an action causes: walk added - ride time saved + neighbours' extra stopping.
// Negative means riders as a whole save time; positive means they lose time.

import type { FeedWarning } from '../common/warnings.js';
import type { DistanceSource } from '../network/types.js';
import type { StoppingModel } from '../model/params.js';
import type { NetworkPlan } from './plan.js';

export type Verdict = 'close' | 'wide' | 'ok' | 'fixed';
export type FixedReason = '' | 'terminal' | 'timepoint' | 'transfer' | 'keep';
export type DemandSource = 'observed' | 'assumed'; // observed = from a ridership file
export type LostTimeSource = 'default' | 'observed'; // observed = from a GTFS-Realtime archive, in part or whole
/** The parts of the lost time per stop that came from a realtime archive. */
export type ObservedLostTimePart = 'door_time' | 'stop_loss';

/** What a realtime archive said about one pattern, whether or not each value was used (null: not observed). */
export interface ObservedFigures {
  tripsObserved: number;
  dwellS: number | null; // mean observed dwell where the bus stopped, boarding included
  doorTimeS: number | null; // the fixed part of dwell (a low quantile of the observed dwells)
  stopLossS: number | null; // braking + accelerating + re-entry per stop served, fitted from run times
  cruiseSpeedMps: number | null; // fitted with the stop loss
  stopShare: number | null; // mean observed share of trips stopping, over intermediate stops with a share
  lostTimeParts: ObservedLostTimePart[]; // which observed parts the lost time per stop uses
}
export type SourceLabel = 'C' | 'S' | 'M' | 'D' | 'user' | 'estimated' | 'observed';

export interface ParamValue {
  value: number | string | null;
  source: SourceLabel;
  note: string; // where the default comes from, in a few words
}

/** Parameters used, by the names of DESIGN.md section 4 (walk_speed_mps, walk_weight, ...). */
export type ParamsReport = Record<string, ParamValue>;

export interface StopResult {
  patternId: string;
  routeId: string;
  directionId: number;
  stopIndex: number; // position in the pattern, 0-based
  stopId: string;
  stopName: string;
  stopLat: number;
  stopLon: number;
  distAlongM: number;
  gapBeforeM: number | null; // null at the first stop
  gapAfterM: number | null; // null at the last stop
  tripsPerDay: number;
  boardingsPerDay: number;
  alightingsPerDay: number;
  loadDepartingPerDay: number; // riders on board leaving this stop, per day
  stopProbability: number; // chance a bus serves the stop on a trip (stopping model)
  localOptimalSpacingM: number | null; // s*(x) for uneven demand; null where undefined (no demand)
  verdict: Verdict;
  fixedReason: FixedReason;
  keptByOptimiser: boolean;
  removalNetPaxMinPerDay: number | null; // null for fixed stops
  removalRunTimeSavedS: number | null; // per trip
  demandSource: DemandSource;
  timepoint: boolean;
  offsetFromShapeM: number | null;
}

export interface GapResult {
  patternId: string;
  fromStopIndex: number; // gap between fromStopIndex and fromStopIndex + 1
  fromStopId: string;
  toStopId: string;
  gapM: number;
  wide: boolean; // above the band's upper edge, and not served by a local route (see coveredByLocal)
  /** A route that calls at both ends with stops of its own between them (this pattern runs limited here), or null; looked for only in gaps above the band. */
  coveredByLocal: string | null;
  overMaxGap: boolean; // above the max_gap_m walking policy
  addNetPaxMinPerDay: number | null; // change in total riders' time if a stop is added mid-gap (wide gaps only)
  addMidLat: number | null;
  addMidLon: number | null;
}

export interface CostCurvePoint {
  spacingM: number;
  costPerRiderS: number; // walk (weighted) + ride delay per rider, seconds, uniform-demand model
}

export interface PatternResult {
  patternId: string;
  routeId: string;
  routeShortName: string;
  routeType: number;
  directionId: number;
  headsign: string;
  shapeId: string;
  distanceSource: DistanceSource;
  stopCount: number;
  lengthM: number;
  tripsPerDay: number;
  medianGapM: number;
  meanGapM: number;
  optimalSpacingM: number; // square-root law with this pattern's parameters
  bandLowM: number;
  bandHighM: number;
  closeStops: number;
  wideGaps: number;
  optimalStopCount: number; // from the dynamic programme
  paxMinLostPerDay: number; // today's cost minus the optimiser's cost, >= 0
  demandSource: DemandSource;
  lostTimeSource: LostTimeSource;
  lostTimePerStopS: number;
  cruiseSpeedMps: number;
  cruiseSpeedSource: SourceLabel;
  /** Run time per trip the schedule holds beyond driving at the cruise speed, stops and boarding (signals, congestion); null when the cruise speed was not estimated from the schedule. */
  trafficDelayS: number | null;
  stoppingModel: StoppingModel; // the stopping model used on this pattern
  meanTripLengthM: number;
  ridersPerDay: number; // boardings per day on the pattern
  runTimeS: number;
  costCurve: CostCurvePoint[];
  currentCostPerRiderS: number; // at today's mean gap on the curve
  optimalCostPerRiderS: number;
  path: [number, number][]; // lon, lat
  /** What a realtime archive said about the pattern; absent or null without one covering it. */
  observed?: ObservedFigures | null;
}

export interface SensitivityCase {
  label: string; // e.g. 'walk_weight=1.5', 'band_tolerance=0.10'
  walkWeight: number;
  bandTolerance: number;
  meanOptimalSpacingM: number;
  closeStops: number;
  wideGaps: number;
  paxMinLostPerDay: number;
  candidatesKept: number; // how many of the base case's top candidates are still candidates here
}

export interface Candidate {
  rank: number;
  action: 'remove' | 'add';
  stopId: string; // '' for an addition
  stopName: string; // for an addition: 'between A and B'
  lat: number;
  lon: number;
  routeIds: string[];
  patternIds: string[];
  netPaxMinPerDay: number; // change in riders' total time; negative = saving (ranked most negative first)
  ridersAffectedPerDay: number; // riders whose stop changes
  walkAddedPaxMinPerDay: number;
  rideSavedPaxMinPerDay: number;
  runTimeSavedPerTripS: number; // weighted over patterns by trips
  vehicleHoursPerDay: number; // saved (positive) or added (negative)
  robust: boolean; // still a saving under every sensitivity case
}

export interface Headline {
  patterns: number;
  stops: number; // distinct stops served
  trips: number;
  medianGapM: number;
  meanOptimalSpacingM: number;
  closeStops: number;
  wideGaps: number;
  paxMinLostPerDay: number;
}

export interface AuditResult {
  tool: { name: 'stopspan'; version: string };
  feed: { source: string; contentHash: string; version: string; publisher: string };
  date: string; // YYYY-MM-DD
  generatedAt: string; // ISO time
  demandSource: DemandSource;
  lostTimeSource: LostTimeSource;
  params: ParamsReport;
  headline: Headline;
  patterns: PatternResult[];
  stops: StopResult[];
  gaps: GapResult[];
  candidates: Candidate[];
  sensitivity: SensitivityCase[];
  warnings: FeedWarning[];
  assumptions: string[]; // plain sentences shown in every report
  /** The optimiser's drops as a scenario (plan.json) with their joint figures; null when it keeps every stop. */
  plan?: NetworkPlan | null;
  /** The realtime archive read, if any (its per-pattern figures are on the patterns). */
  observed?: { source: string; snapshotsRead: number; snapshotsSkipped: number; tripsMatched: number; tripsUnmatched: number } | null;
}
