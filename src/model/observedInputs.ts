// Which value of each running input a pattern uses, and why: the stopping share, the door time, the cruise
// speed and the braking-and-accelerating loss per stop come from a value the user set, from a realtime
// archive, or from the defaults and the schedule, in that order. Each observed value is used wherever it
// was observed, even when the others could not be (equal gaps leave cruise speed and stop loss
// inseparable, but the dwell is still observed); a set value wins over an observed one with a warning
// naming both; and what the archive said is kept for the reports whether or not it was used.

import type { WarningSink } from '../common/warnings.js';
import type { LostTimeSource, ObservedFigures, ObservedLostTimePart, SourceLabel } from './types.js';
import type { Pattern } from '../network/types.js';
import type { ObservedPattern } from '../realtime/types.js';
import { estimateCruiseSpeed, cruiseSpeedBoundsMps } from './cruiseSpeed.js';
import type { PatternDemand } from './demand.js';
import { brakingAcceleratingS } from './lostTime.js';
import type { ModelParams, ParamName, StoppingModel } from './params.js';
import { stopProbability } from './stopping.js';

export interface StoppingChoice {
  stoppingModel: StoppingModel;
  /** Per model stop: the observed share, or the fallback where none was observed (1 where the fallback is every stop served). */
  observedShare: (number | null)[] | undefined;
}

/**
 * The stopping model of a pattern. Without an archive: always on assumed demand, Poisson on counted demand
 * (auto), or the model set. With observed shares (auto or observed): each stop's observed share; a stop
 * without one falls back to the rule the pattern would use without the archive, so on assumed demand the
 * bus serves it (a chance of skipping a stop is only as good as the counts behind it) and on counted
 * demand Poisson decides.
 */
export function chooseStopping(
  params: ModelParams,
  demand: PatternDemand,
  modelStops: number[],
  observed: ObservedPattern | undefined,
  patternId: string,
  warnings: WarningSink,
): StoppingChoice {
  const withoutArchive: StoppingModel = demand.demandSource === 'observed' ? 'poisson' : 'always'; // modelled demand (assumed, land-use) is no count to skip a stop on
  const hasShares = observed !== undefined && modelStops.some((j) => observed.stopShare[j] != null);
  if (hasShares && (params.stopping_model === 'auto' || params.stopping_model === 'observed')) {
    const fill = withoutArchive === 'always' ? 1 : null;
    return { stoppingModel: 'observed', observedShare: modelStops.map((j) => observed.stopShare[j] ?? fill) };
  }
  if (params.stopping_model === 'observed') {
    warnings.add('no-observed-stopping', patternId, 1, {
      used: withoutArchive === 'always' ? 'every stop served (demand assumed)' : 'Poisson on the counted demand',
    });
    return { stoppingModel: withoutArchive, observedShare: undefined };
  }
  if (hasShares) {
    warnings.add('observed-overridden-stopping-model', patternId, 1, { set: params.stopping_model });
  }
  return { stoppingModel: params.stopping_model === 'auto' ? withoutArchive : params.stopping_model, observedShare: undefined };
}

export interface RunningInputs {
  doorTimeS: number;
  cruiseSpeedMps: number;
  cruiseSpeedSource: SourceLabel;
  /** Run time per trip the schedule holds beyond driving, stops and boarding; null unless V was estimated from the schedule. */
  trafficDelayS: number | null;
  /** Braking + accelerating + re-entry per stop served, seconds. */
  stopLossS: number;
  lostTimePerStopS: number;
  lostTimeSource: LostTimeSource;
  /** What the archive said about the pattern (null without one covering it). */
  observedFigures: ObservedFigures | null;
}

const fmt = (x: number): string => String(Math.round(x * 100) / 100);

/** The one warning per overridden input, its message naming the value set; examples name pattern and observed value. */
function overridden(
  warnings: WarningSink,
  code: 'observed-overridden-door-time-s' | 'observed-overridden-cruise-speed-mps',
  setText: string,
  patternId: string,
  observedText: string,
): void {
  warnings.add(code, `${patternId}: set ${setText}, observed ${observedText}`, 1, { set: setText });
}

/**
 * Door time, cruise speed and the loss per stop served for one pattern. `given` names the parameters the
 * user set; `expectedStopsServed` and `boardingsPerTrip` feed the estimate of V from the schedule.
 */
export function chooseRunningInputs(
  params: ModelParams,
  given: ReadonlySet<ParamName>,
  pattern: Pattern,
  {
    lengthM,
    routeType,
    expectedStopsServed,
    boardingsPerTrip,
    modelStops,
  }: { lengthM: number; routeType: number; expectedStopsServed: number; boardingsPerTrip: number; modelStops: number[] },
  observed: ObservedPattern | undefined,
  warnings: WarningSink,
): RunningInputs {
  const obsDoor = observed?.dwellFixedS != null && observed.dwellFixedS >= 0 ? observed.dwellFixedS : null;
  const obsV = observed?.cruiseSpeedMps != null && observed.cruiseSpeedMps > 0 ? observed.cruiseSpeedMps : null;
  const obsLoss = observed?.stopLossS != null && observed.stopLossS >= 0 ? observed.stopLossS : null;
  const parts: ObservedLostTimePart[] = [];

  // door time: the fixed part of the observed dwells, unless the user set one
  let doorTimeS = params.door_time_s;
  if (obsDoor !== null) {
    if (given.has('door_time_s'))
      overridden(warnings, 'observed-overridden-door-time-s', `${fmt(params.door_time_s)} s`, pattern.id, `${fmt(obsDoor)} s`);
    else {
      doorTimeS = obsDoor;
      parts.push('door_time');
    }
  }
  const kin = { doorTimeS, accelMps2: params.accel_mps2, decelMps2: params.decel_mps2, reentryDelayS: params.reentry_delay_s };

  // cruise speed: set, else observed, else from the schedule
  let cruiseSpeedMps: number;
  let cruiseSpeedSource: SourceLabel;
  let trafficDelayS: number | null = null;
  if (params.cruise_speed_mps !== null) {
    cruiseSpeedMps = params.cruise_speed_mps;
    cruiseSpeedSource = 'user';
    if (obsV !== null)
      overridden(warnings, 'observed-overridden-cruise-speed-mps', `${fmt(params.cruise_speed_mps)} m/s`, pattern.id, `${fmt(obsV)} m/s`);
  } else if (obsV !== null) {
    cruiseSpeedMps = obsV;
    cruiseSpeedSource = 'observed';
  } else {
    const est = estimateCruiseSpeed({ runTimeS: pattern.runTimeS, lengthM, expectedStopsServed, boardingsPerTrip, ...kin, routeType });
    cruiseSpeedMps = est.cruiseSpeedMps;
    cruiseSpeedSource = 'estimated';
    trafficDelayS = est.trafficDelayS;
    if (est.basis === 'implausible') {
      const { maxMps } = cruiseSpeedBoundsMps(routeType);
      warnings.add(
        'schedule-too-fast',
        `${pattern.id}: ${Number.isFinite(est.solvedMps) ? `needs ${fmt(est.solvedMps)} m/s` : 'no cruise speed keeps to it'}, highest plausible ${fmt(maxMps)}, used ${fmt(est.cruiseSpeedMps)}`,
      );
    }
  }

  // braking + accelerating + re-entry: the fitted loss goes with the fitted cruise speed, unless the user
  // set the speed or the terms the loss is made of
  const kinematicLossS = brakingAcceleratingS(cruiseSpeedMps, kin) + params.reentry_delay_s;
  let stopLossS = kinematicLossS;
  if (obsLoss !== null) {
    const setTerms = (['cruise_speed_mps', 'accel_mps2', 'decel_mps2', 'reentry_delay_s'] as const).filter((n) => given.has(n));
    if (cruiseSpeedSource === 'observed' && setTerms.length === 0) {
      stopLossS = obsLoss;
      parts.push('stop_loss');
    } else if (setTerms.length > 0) {
      const setText = setTerms.map((n) => `${n}=${fmt(params[n] as number)}`).join(', ');
      warnings.add('observed-overridden-stop-loss', `${pattern.id}: set ${fmt(kinematicLossS)} s, observed ${fmt(obsLoss)} s`, 1, {
        set: setText,
      });
    }
  }

  let observedFigures: ObservedFigures | null = null;
  if (observed) {
    const shares: number[] = [];
    for (let m = 1; m + 1 < modelStops.length; m++) {
      const x = observed.stopShare[modelStops[m]];
      if (x != null) shares.push(x);
    }
    observedFigures = {
      tripsObserved: observed.tripsObserved,
      dwellS: observed.meanDwellS,
      doorTimeS: obsDoor,
      stopLossS: obsLoss,
      cruiseSpeedMps: obsV,
      stopShare: shares.length > 0 ? shares.reduce((s, x) => s + x, 0) / shares.length : null,
      lostTimeParts: parts,
    };
  }
  return {
    doorTimeS,
    cruiseSpeedMps,
    cruiseSpeedSource,
    trafficDelayS,
    stopLossS,
    lostTimePerStopS: doorTimeS + stopLossS,
    lostTimeSource: parts.length > 0 ? 'observed' : 'default',
    observedFigures,
  };
}

/** Expected intermediate stops served per trip today, for the estimate of V from the schedule. */
export function expectedStopsServed(demand: PatternDemand, trips: number, { stoppingModel, observedShare }: StoppingChoice): number {
  let n = 0;
  const count = demand.boardPerDay.length;
  for (let m = 1; m + 1 < count; m++) {
    const lambda = (demand.boardPerDay[m] + demand.alightPerDay[m]) / trips;
    n += stopProbability(lambda, { model: stoppingModel, observedShare: observedShare?.[m] ?? null, baseLambda: lambda });
  }
  return n;
}
