// Everything the model needs about one pattern before any verdict: its passenger stops, their demand laid
// on a corridor, the lost time per stop and the cruise speed behind it (given, observed, or estimated so
// the schedule is explained), the stops that must stay, and the effective square-root optimum.

import type { WarningSink } from '../common/warnings.js';
import type { Feed } from '../gtfs/types.js';
import type { Pattern, PatternSet } from '../network/types.js';
import type { FixedReason, LostTimeSource, ObservedFigures, SourceLabel } from './types.js';
import type { ObservedPattern } from '../realtime/types.js';
import { Corridor, type CostSettings } from './corridor.js';
import type { PatternDemand } from './demand.js';
import { chooseRunningInputs, chooseStopping, expectedStopsServed } from './observedInputs.js';
import type { ModelParams, ParamName, StoppingModel } from './params.js';

export interface PreparedPattern {
  pattern: Pattern;
  routeShortName: string;
  routeType: number;
  modelStops: number[]; // positions in the pattern of its passenger stops
  posM: number[]; // distance along of each model stop
  demand: PatternDemand;
  corridor: Corridor;
  lostTimePerStopS: number;
  lostTimeSource: LostTimeSource;
  cruiseSpeedMps: number;
  cruiseSpeedSource: SourceLabel;
  meanTripLengthM: number;
  observedShare: (number | null)[] | undefined; // per model stop
  stoppingModel: StoppingModel; // the model used on this pattern (auto resolved)
  trafficDelayS: number | null; // run time per trip the schedule holds beyond driving, stops and boarding; null unless estimated
  observedFigures: ObservedFigures | null; // what a realtime archive said about the pattern, used or not
  /** For model gap m, a route serving it as a local (stops of its own between the ends), or null; set by the audit. */
  gapLocalCover: (m: number) => string | null;
  /** Per model gap: an express stretch (long and run at express speed, or on an express route type); set by the audit. */
  expressGap: boolean[];
  fixedReason: FixedReason[]; // per model stop
  fixedNote: string[]; // per model stop: the routes or station behind a transfer or station reason, else ''
  /** Per model stop: the context station within walking distance ("station X (feed), 60 m"), whatever keeps the stop, else ''. */
  nearStation: string[];
}

export function preparePattern(
  feed: Feed,
  patternSet: PatternSet,
  pattern: Pattern,
  demandOf: (modelStops: number[], posM: number[]) => PatternDemand,
  params: ModelParams,
  {
    keep = new Set<string>(),
    observed,
    warnings,
    transfers = new Map(),
    stations = new Map(),
    given = new Set<ParamName>(),
  }: {
    keep?: Set<string>;
    observed?: ObservedPattern;
    warnings: WarningSink;
    /** Transfer points of the network (stop index -> note), from transferPoints; none: no stop is kept as a transfer. */
    transfers?: ReadonlyMap<number, string>;
    /** Stops within walking distance of another mode's station (stop index -> note naming it). */
    stations?: ReadonlyMap<number, string>;
    given?: ReadonlySet<ParamName>;
  },
): PreparedPattern | null {
  const modelStops: number[] = [];
  for (let j = 0; j < pattern.stopIdx.length; j++) if (pattern.passengerStop[j] !== false) modelStops.push(j);
  if (modelStops.length < 2) {
    warnings.add('pattern-too-short', pattern.id);
    return null;
  }
  const posM = modelStops.map((j) => pattern.distAlongM[j]);
  const route = feed.routes.get(pattern.routeId);
  const routeType = route?.type ?? 3;
  const demand = demandOf(modelStops, posM);
  const trips = pattern.tripsPerDay > 0 ? pattern.tripsPerDay : 1;
  const corridor = new Corridor({
    posM,
    boardPerDay: demand.boardPerDay,
    alightPerDay: demand.alightPerDay,
    tripsPerDay: trips,
    catchmentHalfMaxM: params.max_gap_m / 2,
  });
  if (demand.tooShortForTrip) {
    warnings.add(
      'pattern-short-for-trip',
      `${pattern.id} ${Math.round(demand.meanTripLengthM)} m of ${Math.round(demand.askedTripLengthM ?? 0)} m`,
    );
  }

  // stopping, door time, cruise speed and loss per stop: set by the user, observed, or default (observedInputs.ts)
  const stopping = chooseStopping(params, demand, modelStops, observed, pattern.id, warnings);
  const { stoppingModel, observedShare } = stopping;
  const run = chooseRunningInputs(
    params,
    given,
    pattern,
    {
      lengthM: posM[posM.length - 1] - posM[0],
      routeType,
      expectedStopsServed: expectedStopsServed(demand, trips, stopping),
      boardingsPerTrip: demand.ridersPerDay / trips,
      modelStops,
    },
    observed,
    warnings,
  );
  const { cruiseSpeedMps, cruiseSpeedSource, trafficDelayS, lostTimeSource, observedFigures } = run;
  const lostTime = run.lostTimePerStopS;

  // the mean trip of the load profile every figure is computed from (the one asked for, where it fits)
  const meanTripLengthM = demand.meanTripLengthM;

  // stops that must stay
  const fixedReason: FixedReason[] = modelStops.map(() => '');
  const fixedNote: string[] = modelStops.map(() => '');
  const nearStation: string[] = modelStops.map((j) => stations.get(pattern.stopIdx[j]) ?? '');
  const n = modelStops.length;
  let timepoints = 0;
  for (let m = 1; m + 1 < n; m++) if (pattern.timepoint[modelStops[m]]) timepoints++;
  const timepointsInformative = timepoints <= 0.5 * Math.max(1, n - 2);
  if (!timepointsInformative) warnings.add('timepoints-not-forced', pattern.id);
  for (let m = 0; m < n; m++) {
    const j = modelStops[m];
    const stopIdx = pattern.stopIdx[j];
    const stopId = feed.stops[stopIdx]?.id ?? '';
    if (m === 0 || m === n - 1) fixedReason[m] = 'terminal';
    else if (keep.has(stopId)) fixedReason[m] = 'keep';
    else if (timepointsInformative && pattern.timepoint[j]) fixedReason[m] = 'timepoint';
    else if (stations.has(stopIdx)) {
      fixedReason[m] = 'station';
      fixedNote[m] = stations.get(stopIdx)!;
    } else if (transfers.has(stopIdx)) {
      fixedReason[m] = 'transfer';
      fixedNote[m] = transfers.get(stopIdx)!;
    }
  }
  return {
    pattern,
    routeShortName: route?.shortName ?? '',
    routeType,
    modelStops,
    posM,
    demand,
    corridor,
    lostTimePerStopS: lostTime,
    lostTimeSource,
    cruiseSpeedMps,
    cruiseSpeedSource,
    meanTripLengthM,
    observedShare,
    stoppingModel,
    trafficDelayS,
    observedFigures,
    gapLocalCover: () => null,
    expressGap: [],
    fixedReason,
    fixedNote,
    nearStation,
  };
}

/** The cost settings of a prepared pattern at a walk weight (operating cost off unless asked). */
export function costSettings(
  prep: PreparedPattern,
  params: ModelParams,
  { walkWeight = params.walk_weight, withOperatingCost = false }: { walkWeight?: number; withOperatingCost?: boolean } = {},
): CostSettings {
  const op =
    withOperatingCost && params.operating_cost_per_vehicle_hour !== null && params.value_of_time_per_hour !== null
      ? params.operating_cost_per_vehicle_hour / params.value_of_time_per_hour
      : 0;
  return {
    walkSpeedMps: params.walk_speed_mps,
    walkWeight,
    lostTimePerStopS: prep.lostTimePerStopS,
    stoppingModel: prep.stoppingModel,
    observedShare: prep.observedShare,
    operatingPaxSPerBusS: op,
  };
}
