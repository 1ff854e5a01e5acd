// The audit's result: everything the reports (HTML, CSV, GeoJSON, JSON) draw on. Metres, seconds and
// passengers per day internally; conversion to imperial happens only when rendering.
//
// Sign convention (DESIGN.md section 4): a "net passenger-minutes per day" figure is the CHANGE in riders'
// total time that an action causes: walk added - ride time saved + neighbours' extra stopping.
// Negative means riders as a whole save time; positive means they lose time.

import type { FeedWarning } from '../common/warnings.js';
import type { DistanceSource } from '../network/types.js';
import type { StoppingModel } from '../model/params.js';
import type { DemandSource, FixedReason, LostTimeSource, ObservedFigures, ParamsReport, SourceLabel } from '../model/types.js';
import type { ScenarioInput, ScenarioResult } from '../model/scenario.js';
import type { DensityGrid } from '../model/catchments.js';

export type Verdict = 'close' | 'wide' | 'ok' | 'fixed';
/** A stop's own verdict, apart from the gaps beside it (see verdictKinds.ts). */
export type StopOwnVerdict = 'close' | 'ok' | 'fixed' | 'timing-only';
/** A gap's verdict between two consecutive passenger stops (see verdictKinds.ts). */
export type GapVerdict = 'short' | 'ok' | 'wide' | 'local' | 'express';

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
  verdict: Verdict; // the first verdict column: 'wide' here is a gap's label given to the stop beside it
  stopVerdict: StopOwnVerdict; // the stop's own verdict
  gapBeforeVerdict: GapVerdict | null; // the gap from the previous passenger stop; null at the first and at a timing-only point
  gapAfterVerdict: GapVerdict | null; // the gap to the next passenger stop; null at the last and at a timing-only point
  fixedReason: FixedReason;
  fixedNote: string; // the routes or the station behind a transfer or station reason, else ''
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
  verdict: GapVerdict;
  wide: boolean; // above the band's upper edge, and not served by a local route (see coveredByLocal)
  /** A route that calls at both ends with stops of its own between them (this pattern runs limited here), or null; looked for only in gaps above the band. */
  coveredByLocal: string | null;
  /** A non-stop run of 2 km or more at express speed, or a gap of an express route type: not judged wide. */
  expressStretch: boolean;
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
  paxMinLostPerDay: number; // today's cost minus the optimiser's cost, >= 0: what removals have at stake
  /** What the proposed additions on this pattern save its riders, weighed together on the pattern (passenger-minutes per day, positive = saved). */
  paxMinAdditionsPerDay: number;
  /** paxMinLostPerDay + paxMinAdditionsPerDay: removals and additions together. */
  paxMinAtStakePerDay: number;
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
  /** With a land-use layer: people (weighted) within a walk of a stop of the pattern; absent or null without one. */
  peopleCovered?: number | null;
}

export interface SensitivityCase {
  label: string; // e.g. 'walk_weight=1.5', 'band_tolerance=0.10'
  walkWeight: number;
  bandTolerance: number;
  meanOptimalSpacingM: number;
  closeStops: number;
  wideGaps: number; // distinct stop pairs, as the headline counts them
  paxMinLostPerDay: number;
  candidatesKept: number; // how many of the base case's top candidates are still candidates here
  /** The programme as accepted, weighed again in this order at this case's settings: its net, and how many of its candidates still save riders time given those above them. */
  programmeNetPaxMinPerDay: number;
  programmeStillSaving: number;
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
  robust: boolean; // its marginal net in the programme as accepted stays a saving in every sensitivity case
  /** For an addition, the stop_ids of the two stops whose gap it fills, in the direction of travel; '' for a removal. */
  fromStopId: string;
  toStopId: string;
  /** For an addition, the gap it fills along the pattern (the first pattern's), metres; null for a removal. */
  gapM: number | null;
  /** What an addition stands on (witness stops near the site, or the land-use layer's people); '' for a removal. */
  evidence: string;
  /** With a land-use layer, for a removal: people (weighted) within a walk of the stop and of no other stop served, left uncovered; absent otherwise. */
  peopleUncovered?: number | null;
}

/** A wide gap where no stop is proposed for want of evidence that people are there: length and reason, no passenger-minute figure. */
export interface ReviewGap {
  fromStopId: string;
  toStopId: string;
  name: string; // 'between A and B'
  lat: number; // the middle of the gap
  lon: number;
  gapM: number;
  routeIds: string[];
  patternIds: string[];
  reason: 'fast-stretch' | 'long-straight-empty' | 'no-stop-near' | 'no-people-near';
  detail: string; // the reason in words
}

/** The land-use layer read and what it says of the network (AuditResult.landUse). */
export interface LandUseSummary {
  file: string;
  format: 'csv' | 'geojson';
  /** Each column read, its weight, its total over the layer and the part within a walk of a stop served. */
  columns: { name: string; weight: number; total: number; covered: number }[];
  features: number;
  /** Features with no point within a walk of a stop served. */
  featuresOutsideCatchments: number;
  points: number;
  people: number; // weighted
  peopleCovered: number; // weighted, within a walk of a stop served
  walkRadiusM: number;
  walkDetour: number;
  /** The layer's people in squares near the stops served, drawn lightly under each pattern's map on the page. */
  density?: DensityGrid;
}

export interface Headline {
  patterns: number;
  stops: number; // distinct stops served
  trips: number;
  medianGapM: number;
  meanOptimalSpacingM: number;
  closeStops: number;
  wideGaps: number; // distinct pairs of stops with a wide gap between them: a gap shared by several patterns counts once
  wideGapsOnPatterns: number; // the same gaps counted on every pattern that runs them (the sum of patterns' wideGaps)
  paxMinLostPerDay: number; // removals: the optimiser's drops, summed over patterns
  paxMinAdditionsPerDay: number; // additions: the proposed additions, summed over patterns
  paxMinAtStakePerDay: number; // the two together
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
  /** Wide gaps without evidence for a stop, longest first. */
  reviewGaps: ReviewGap[];
  sensitivity: SensitivityCase[];
  warnings: FeedWarning[];
  assumptions: string[]; // plain sentences shown in every report
  /** The optimiser's drops as a scenario (plan.json) with their joint figures; null when it keeps every stop. */
  plan?: NetworkPlan | null;
  /** The land-use layer read and the network's coverage; null or absent without one. */
  landUse?: LandUseSummary | null;
  /** The realtime archive read, if any (its per-pattern figures are on the patterns). */
  observed?: { source: string; snapshotsRead: number; snapshotsSkipped: number; tripsMatched: number; tripsUnmatched: number } | null;
}

/** The optimiser's plan over the network: the stops it drops as a scenario, and their joint figures. */
export interface NetworkPlan {
  scenario: ScenarioInput; // remove lists only: each stop with the patterns it is dropped on
  stopsDropped: number; // distinct feed stops
  dropsOnPatterns: number; // (stop, pattern) pairs
  patternsChanged: number;
  figures: Pick<ScenarioResult, 'totals' | 'sensitivity' | 'fleet'>;
}
