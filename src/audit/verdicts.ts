// One pattern's verdicts: the optimum spacing and its band, the optimiser's stop count and the riders'
// minutes lost to today's spacing, and for every stop close / wide / ok / fixed with the numbers behind it
// (gaps, net passenger-minutes per day if it were removed; a stop is close when its spacing is below the
// band and its removal saves riders time); for every gap above the band, the change if a
// stop were added in its middle. All figures come from the corridor cost the optimiser minimises, so a
// removal figure is exactly the change in that objective.

import type { Feed } from '../gtfs/types.js';
import type { CostCurvePoint, GapResult, GapVerdict, PatternResult, StopResult, Verdict } from './types.js';
import { bandM } from '../model/band.js';
import { type CostSettings, type ServedStop, servedStopCost, servedSetCostS } from '../model/corridor.js';
import { effectiveOptimum, type EffectiveOptimum } from '../model/effectiveOptimum.js';
import { localOptimalSpacingM } from '../model/localOptimum.js';
import { optimiseStopsAt, type OptimiseResult } from '../model/optimiser.js';
import { costPerRiderS, type SqrtLawInput } from '../model/sqrtLaw.js';
import { costSettings, type PreparedPattern } from '../model/preparePattern.js';
import type { ModelParams } from '../model/params.js';
import { median } from '../common/median.js';

/** The effect of one change on one pattern, in rider-seconds per day and bus seconds per trip. */
export interface ChangeEffect {
  netPaxMinPerDay: number;
  walkAddedPaxMinPerDay: number; // negative for an addition (walk saved)
  rideSavedPaxMinPerDay: number; // ride time saved, net of the neighbours' changed stopping
  runTimeSavedPerTripS: number;
  ridersAffectedPerDay: number;
}

export interface RemovalEffect extends ChangeEffect {
  patternId: string;
  routeId: string;
  tripsPerDay: number;
  stopIdx: number; // feed stop index
  modelPos: number; // position among the pattern's model stops
  gapAfterRemovalM: number;
}

export interface AdditionEffect extends ChangeEffect {
  patternId: string;
  routeId: string;
  tripsPerDay: number;
  fromStopIdx: number;
  toStopIdx: number;
  lat: number;
  lon: number;
  gapM: number;
  /** Scheduled seconds between the gap's ends (median trip, dwell at skipped stops included); null when unknown. */
  scheduledS: number | null;
}

export interface PatternAnalysis {
  result: PatternResult;
  stops: StopResult[];
  gaps: GapResult[];
  removals: RemovalEffect[];
  additions: AdditionEffect[];
  fixedStopIdx: number[]; // feed stops that must stay on this pattern
  feedStopsByModelPos: number[];
  modelPosM: number[]; // distance along of each model stop
}

const S_TO_MIN = 1 / 60;

/**
 * What a change does to one pattern apart from the walk weight: the metres walked per day on the stretches
 * it joins or splits (each to be weighted), and the ride and bus time, which the walk weight does not touch.
 * The sensitivity cases differ in the walk weight only, so these are computed once per pattern.
 */
export interface ChangeParts {
  walkJoinedM: number; // the stretch the change makes (one, for a removal) or unmakes (for an addition)
  walkSplitLeftM: number;
  walkSplitRightM: number;
  rideSavedS: number; // rider-seconds per day
  runTimeSavedPerTripS: number;
  ridersAffectedPerDay: number;
}

/** Each intermediate model stop served between its neighbours as they are today (null at the ends). */
function servedToday(prep: PreparedPattern, settings: CostSettings): (ServedStop | null)[] {
  const c = prep.corridor;
  const x = c.posM;
  const out: (ServedStop | null)[] = [];
  for (let m = 0; m < c.n; m++) out.push(m > 0 && m < c.n - 1 ? servedStopCost(c, x[m - 1], x[m], x[m + 1], m, settings) : null);
  return out;
}

/**
 * The walk-weight-free parts of removing model stop m (0 < m < n-1) with both neighbours kept. `today`
 * (servedToday of the same settings) saves computing again what each stop costs as it is served now.
 */
export function removalParts(
  prep: PreparedPattern,
  m: number,
  settings: CostSettings,
  today: (ServedStop | null)[] = servedToday(prep, settings),
): ChangeParts {
  const c = prep.corridor;
  const x = c.posM;
  const n = c.n;
  if (!(m > 0 && m < n - 1)) throw new RangeError(`removalEffect: not an intermediate stop: ${m}`);
  const own = today[m] as ServedStop;
  let neighbourCostS = 0;
  let neighbourBusS = 0;
  if (m - 1 > 0) {
    const after = servedStopCost(c, x[m - 2], x[m - 1], x[m + 1], m - 1, settings);
    const before = today[m - 1] as ServedStop;
    neighbourCostS += after.costS - before.costS;
    neighbourBusS += after.busTimePerTripS - before.busTimePerTripS;
  }
  if (m + 1 < n - 1) {
    const after = servedStopCost(c, x[m - 1], x[m + 1], x[m + 2], m + 1, settings);
    const before = today[m + 1] as ServedStop;
    neighbourCostS += after.costS - before.costS;
    neighbourBusS += after.busTimePerTripS - before.busTimePerTripS;
  }
  return {
    walkJoinedM: c.walkBetweenM(x[m - 1], x[m + 1]),
    walkSplitLeftM: c.walkBetweenM(x[m - 1], x[m]),
    walkSplitRightM: c.walkBetweenM(x[m], x[m + 1]),
    rideSavedS: own.costS - neighbourCostS,
    runTimeSavedPerTripS: own.busTimePerTripS - neighbourBusS,
    ridersAffectedPerDay: c.boardPerDay[m] + c.alightPerDay[m],
  };
}

/** The walk-weight-free parts of adding a stop at position q between model stops m and m+1. */
export function additionParts(prep: PreparedPattern, m: number, q: number, settings: CostSettings): ChangeParts {
  const c = prep.corridor;
  const x = c.posM;
  const n = c.n;
  if (!(m >= 0 && m < n - 1) || !(q >= x[m] && q <= x[m + 1])) throw new RangeError(`additionEffect: position ${q} not in gap ${m}`);
  const own = servedStopCost(c, x[m], q, x[m + 1], -1, settings);
  let neighbourCostS = 0;
  let neighbourBusS = 0;
  if (m > 0) {
    const after = servedStopCost(c, x[m - 1], x[m], q, m, settings);
    const before = servedStopCost(c, x[m - 1], x[m], x[m + 1], m, settings);
    neighbourCostS += after.costS - before.costS;
    neighbourBusS += after.busTimePerTripS - before.busTimePerTripS;
  }
  if (m + 1 < n - 1) {
    const after = servedStopCost(c, q, x[m + 1], x[m + 2], m + 1, settings);
    const before = servedStopCost(c, x[m], x[m + 1], x[m + 2], m + 1, settings);
    neighbourCostS += after.costS - before.costS;
    neighbourBusS += after.busTimePerTripS - before.busTimePerTripS;
  }
  return {
    walkJoinedM: c.walkBetweenM(x[m], x[m + 1]),
    walkSplitLeftM: c.walkBetweenM(x[m], q),
    walkSplitRightM: c.walkBetweenM(q, x[m + 1]),
    rideSavedS: -(own.costS + neighbourCostS),
    runTimeSavedPerTripS: -(own.busTimePerTripS + neighbourBusS),
    ridersAffectedPerDay: own.endsPerDay,
  };
}

/** A change's effect at a walk weight, from its parts (walk costs as walkCostS weighs them). */
function changeEffect(parts: ChangeParts, { walkSpeedMps, walkWeight }: CostSettings, sign: 1 | -1): ChangeEffect {
  const k = walkWeight / walkSpeedMps;
  // a removal joins two stretches into one, an addition splits one into two
  const walkAdded =
    sign === 1
      ? k * parts.walkJoinedM - k * parts.walkSplitLeftM - k * parts.walkSplitRightM
      : k * parts.walkSplitLeftM + k * parts.walkSplitRightM - k * parts.walkJoinedM;
  return {
    netPaxMinPerDay: (walkAdded - parts.rideSavedS) * S_TO_MIN,
    walkAddedPaxMinPerDay: walkAdded * S_TO_MIN,
    rideSavedPaxMinPerDay: parts.rideSavedS * S_TO_MIN,
    runTimeSavedPerTripS: parts.runTimeSavedPerTripS,
    ridersAffectedPerDay: parts.ridersAffectedPerDay,
  };
}

/** Change in cost from removing model stop m (0 < m < n-1) with both neighbours kept. */
export function removalEffect(prep: PreparedPattern, m: number, settings: CostSettings): ChangeEffect {
  return changeEffect(removalParts(prep, m, settings), settings, 1);
}

/** Change in cost from adding a stop at position q between model stops m and m+1. */
export function additionEffect(prep: PreparedPattern, m: number, q: number, settings: CostSettings): ChangeEffect {
  return changeEffect(additionParts(prep, m, q, settings), settings, -1);
}

/**
 * What analysePattern needs of a pattern that no walk weight or band changes: the gaps and the lookups
 * between pattern and model positions, each intermediate stop's chance of being served and its removal's
 * parts, each gap's addition parts (at its middle), and the optimiser's result per walk weight once asked
 * for. Built once per pattern and shared by the base audit and its sensitivity cases.
 */
export interface PatternParts {
  probability: number[]; // per model stop (1 at the ends)
  removal: (ChangeParts | null)[]; // per model stop; null at the ends and for fixed stops
  addition: (ChangeParts | undefined)[]; // per gap, filled when a gap is first found wide
  optimised: Map<number, Optimised>; // by walk weight
  /** The walk weights optimised together when the first of them is asked for (one sweep of the stops serves all). */
  walkWeights: number[];
  gapsM: number[]; // per model gap
  medianGapM: number;
  feedStopsByModelPos: number[];
  modelPosOf: Map<number, number>; // pattern stop index -> model position
}

export function patternParts(prep: PreparedPattern, params: ModelParams, walkWeights: number[] = [params.walk_weight]): PatternParts {
  const settings = costSettings(prep, params, {});
  const { posM, modelStops, pattern } = prep;
  const n = modelStops.length;
  const gapsM: number[] = [];
  for (let m = 0; m + 1 < n; m++) gapsM.push(posM[m + 1] - posM[m]);
  const today = servedToday(prep, settings);
  const probability: number[] = [];
  const removal: (ChangeParts | null)[] = [];
  for (let m = 0; m < n; m++) {
    probability.push(today[m]?.probability ?? 1);
    removal.push(m > 0 && m < n - 1 && prep.fixedReason[m] === '' ? removalParts(prep, m, settings, today) : null);
  }
  return {
    probability,
    removal,
    addition: [],
    optimised: new Map(),
    walkWeights,
    gapsM,
    medianGapM: median(gapsM, 0),
    feedStopsByModelPos: modelStops.map((j) => pattern.stopIdx[j]),
    modelPosOf: new Map(modelStops.map((j, m) => [j, m])),
  };
}

type StopBase = Pick<
  StopResult,
  | 'patternId'
  | 'routeId'
  | 'directionId'
  | 'stopIndex'
  | 'stopId'
  | 'stopName'
  | 'stopLat'
  | 'stopLon'
  | 'distAlongM'
  | 'tripsPerDay'
  | 'demandSource'
  | 'timepoint'
  | 'offsetFromShapeM'
>;

/**
 * One stop's result from its pattern fields and its model figures, every field written out. (Tried as a
 * speed fix for the object spread it replaced; on the Manhattan bus feed the audit's output is identical
 * and its CPU time the same within noise, so this is a matter of style only.)
 */
function stopResult(b: StopBase, x: Omit<StopResult, keyof StopBase>): StopResult {
  return {
    patternId: b.patternId,
    routeId: b.routeId,
    directionId: b.directionId,
    stopIndex: b.stopIndex,
    stopId: b.stopId,
    stopName: b.stopName,
    stopLat: b.stopLat,
    stopLon: b.stopLon,
    distAlongM: b.distAlongM,
    gapBeforeM: x.gapBeforeM,
    gapAfterM: x.gapAfterM,
    tripsPerDay: b.tripsPerDay,
    boardingsPerDay: x.boardingsPerDay,
    alightingsPerDay: x.alightingsPerDay,
    loadDepartingPerDay: x.loadDepartingPerDay,
    stopProbability: x.stopProbability,
    localOptimalSpacingM: x.localOptimalSpacingM,
    verdict: x.verdict,
    stopVerdict: x.stopVerdict,
    gapBeforeVerdict: x.gapBeforeVerdict,
    gapAfterVerdict: x.gapAfterVerdict,
    fixedReason: x.fixedReason,
    fixedNote: x.fixedNote,
    keptByOptimiser: x.keptByOptimiser,
    removalNetPaxMinPerDay: x.removalNetPaxMinPerDay,
    removalRunTimeSavedS: x.removalRunTimeSavedS,
    demandSource: b.demandSource,
    timepoint: b.timepoint,
    offsetFromShapeM: b.offsetFromShapeM,
  };
}

/** One pattern's optimum spacing at a walk weight, its near-optimal band, and the square-root law's inputs at it. */
interface PatternOptimum {
  opt: EffectiveOptimum;
  hasOptimum: boolean;
  band: { lowM: number; highM: number };
  lawInput: SqrtLawInput;
}

/** The optimiser's stops at one walk weight, and today's stops' cost by the same objective. */
interface Optimised {
  best: OptimiseResult;
  todayCostS: number;
}

/** The stop step's rows and tallies. */
interface StopRows {
  stops: StopResult[]; // empty without detail
  removals: RemovalEffect[];
  fixedStopIdx: number[];
  closeStops: number;
}

/** The gap step's rows and tallies. */
interface GapRows {
  gaps: GapResult[]; // empty without detail
  additions: AdditionEffect[];
  wideGaps: number;
}

export function analysePattern(
  feed: Feed,
  prep: PreparedPattern,
  params: ModelParams,
  {
    walkWeight = params.walk_weight,
    bandTolerance = params.band_tolerance,
    parts = patternParts(prep, params),
    detail = true,
  }: {
    walkWeight?: number;
    bandTolerance?: number;
    /** false: only the pattern's figures, changes and counts, without the per-stop and per-gap rows (stops, gaps and costCurve left empty), as the sensitivity cases need. */
    detail?: boolean;
    /** The pattern's walk-weight-free parts (patternParts(prep, params)), when shared between cases. */
    parts?: PatternParts;
  } = {},
): PatternAnalysis {
  const settings = costSettings(prep, params, { walkWeight });
  const optimum = patternOptimum(prep, params, settings, { walkWeight, bandTolerance });
  const costCurve = optimum.hasOptimum && detail ? costCurveOf(optimum) : [];
  const { best, todayCostS } = optimisedAt(prep, params, parts, walkWeight);
  // rounding noise of the two sums is not a loss
  const lostS = todayCostS - best.costS;
  const paxMinLostPerDay = lostS > 1e-9 * Math.max(1, todayCostS) ? lostS * S_TO_MIN : 0;
  const keptSet = detail ? new Set(best.kept) : null;
  const gapVerdicts = detail ? gapVerdictsOf(prep, parts.gapsM, optimum) : [];
  const { stops, removals, fixedStopIdx, closeStops } = stopRows(feed, prep, params, parts, settings, optimum, {
    walkWeight,
    detail,
    gapVerdicts,
    keptSet,
  });
  const { gaps, additions, wideGaps } = gapRows(feed, prep, params, parts, settings, optimum, { detail, gapVerdicts });
  const result = patternResult(prep, parts, optimum, { best, paxMinLostPerDay, closeStops, wideGaps, costCurve });
  return { result, stops, gaps, removals, additions, fixedStopIdx, feedStopsByModelPos: parts.feedStopsByModelPos, modelPosM: prep.posM };
}

/** The optimum spacing (the square-root law with the lost time a bus incurs per stop) and its band. */
function patternOptimum(
  prep: PreparedPattern,
  params: ModelParams,
  settings: CostSettings,
  { walkWeight, bandTolerance }: { walkWeight: number; bandTolerance: number },
): PatternOptimum {
  const { corridor, posM, demand } = prep;
  const n = prep.modelStops.length;
  const lengthM = posM[n - 1] - posM[0];
  const trips = corridor.tripsPerDay;
  const endsPerTrip = (demand.ridersPerDay + demand.alightPerDay.reduce((s, a) => s + a, 0)) / trips;
  const shares = prep.observedShare?.filter((x): x is number => x !== null) ?? [];
  const opt = effectiveOptimum(settings, {
    meanTripLengthM: prep.meanTripLengthM,
    tripEndsPerTripPerM: lengthM > 0 ? endsPerTrip / lengthM : 0,
    meanObservedShare: shares.length ? shares.reduce((s, x) => s + x, 0) / shares.length : null,
  });
  const hasOptimum = opt.spacingM > 0 && Number.isFinite(opt.spacingM);
  const band = hasOptimum ? bandM(opt.spacingM, bandTolerance) : { lowM: 0, highM: Infinity };
  const lawInput: SqrtLawInput = {
    walkSpeedMps: params.walk_speed_mps,
    walkWeight,
    lostTimePerStopS: opt.effectiveLostTimeS,
    meanTripLengthM: prep.meanTripLengthM,
  };
  return { opt, hasOptimum, band, lawInput };
}

/** The cost per rider against spacing, from a quarter of the optimum to three times it (only where there is an optimum). */
function costCurveOf({ opt, lawInput }: PatternOptimum): CostCurvePoint[] {
  const costCurve: CostCurvePoint[] = [];
  for (let k = 0; k <= 30; k++) {
    const spacingM = opt.spacingM * (0.25 + (k * 2.75) / 30);
    costCurve.push({ spacingM, costPerRiderS: costPerRiderS(spacingM, lawInput) });
  }
  return costCurve;
}

/**
 * The optimiser, with operating cost when set, and today's cost by the same objective (this walk weight
 * with the others of parts.walkWeights not optimised yet, in one run); kept in parts.optimised.
 */
function optimisedAt(prep: PreparedPattern, params: ModelParams, parts: PatternParts, walkWeight: number): Optimised {
  const known = parts.optimised.get(walkWeight);
  if (known) return known;
  const { corridor } = prep;
  const n = prep.modelStops.length;
  const weights = [walkWeight, ...new Set(parts.walkWeights.filter((w) => w !== walkWeight && !parts.optimised.has(w)))];
  const optSettings = weights.map((w) => costSettings(prep, params, { walkWeight: w, withOperatingCost: true }));
  const forced = prep.fixedReason.map((r) => r !== '');
  const bests = optimiseStopsAt(corridor, optSettings, { forced, maxGapM: params.max_gap_m });
  weights.forEach((w, q) =>
    parts.optimised.set(w, { best: bests[q], todayCostS: servedSetCostS(corridor, [...Array(n).keys()], optSettings[q]) }),
  );
  return parts.optimised.get(walkWeight)!;
}

/** Each gap's verdict (the rows only): a gap is judged on its own, apart from the stops at its ends. */
function gapVerdictsOf(prep: PreparedPattern, gapsM: number[], { hasOptimum, band }: PatternOptimum): GapVerdict[] {
  const n = prep.modelStops.length;
  const gapVerdicts: GapVerdict[] = [];
  for (let g = 0; g + 1 < n; g++) {
    const above = hasOptimum && gapsM[g] > band.highM;
    gapVerdicts.push(
      above
        ? prep.expressGap[g] === true
          ? 'express'
          : prep.gapLocalCover(g) === null
            ? 'wide'
            : 'local'
        : hasOptimum && gapsM[g] < band.lowM
          ? 'short'
          : 'ok',
    );
  }
  return gapVerdicts;
}

/** A stop's fields from its pattern, before the model's figures. */
function stopBase({ pattern, demand }: PreparedPattern, j: number, stop: Feed['stops'][number] | undefined): StopBase {
  return {
    patternId: pattern.id,
    routeId: pattern.routeId,
    directionId: pattern.directionId,
    stopIndex: j,
    stopId: stop?.id ?? '',
    stopName: stop?.name ?? '',
    stopLat: stop?.lat ?? NaN,
    stopLon: stop?.lon ?? NaN,
    distAlongM: pattern.distAlongM[j],
    tripsPerDay: pattern.tripsPerDay,
    demandSource: demand.demandSource,
    timepoint: pattern.timepoint[j] === true,
    offsetFromShapeM: pattern.offsetFromShapeM[j] ?? null,
  };
}

/** Stops: each stop's verdict, its removal's effect, and (with detail) its row. */
function stopRows(
  feed: Feed,
  prep: PreparedPattern,
  params: ModelParams,
  parts: PatternParts,
  settings: CostSettings,
  { hasOptimum, band }: PatternOptimum,
  {
    walkWeight,
    detail,
    gapVerdicts,
    keptSet,
  }: { walkWeight: number; detail: boolean; gapVerdicts: GapVerdict[]; keptSet: Set<number> | null },
): StopRows {
  const { pattern, corridor, demand } = prep;
  const n = prep.modelStops.length;
  const { gapsM, modelPosOf } = parts;
  const stops: StopResult[] = [];
  const removals: RemovalEffect[] = [];
  // gap g (between model stops g and g+1) is wide: above the band, and no other route serves it locally
  const wideGap = (g: number): boolean =>
    g >= 0 && g + 1 < n && gapsM[g] > band.highM && prep.expressGap[g] !== true && prep.gapLocalCover(g) === null;
  const fixedStopIdx: number[] = [];
  let closeStops = 0;
  for (let j = 0; j < pattern.stopIdx.length; j++) {
    const stopIdx = pattern.stopIdx[j];
    const stop = feed.stops[stopIdx];
    const m = modelPosOf.get(j);
    if (m === undefined) {
      // not a passenger stop: kept for geometry only, and no reason to keep the stop on a pattern that
      // serves riders there (a timing point of one route does not fix another route's stop)
      if (detail)
        stops.push(
          stopResult(stopBase(prep, j, stop), {
            gapBeforeM: null,
            gapAfterM: null,
            boardingsPerDay: 0,
            alightingsPerDay: 0,
            loadDepartingPerDay: 0,
            stopProbability: 0,
            localOptimalSpacingM: null,
            verdict: 'fixed',
            stopVerdict: 'timing-only',
            gapBeforeVerdict: null,
            gapAfterVerdict: null,
            fixedReason: '',
            fixedNote: '',
            keptByOptimiser: true,
            removalNetPaxMinPerDay: null,
            removalRunTimeSavedS: null,
          }),
        );
      continue;
    }
    const gapBeforeM = m > 0 ? gapsM[m - 1] : null;
    const gapAfterM = m + 1 < n ? gapsM[m] : null;
    const ends = corridor.boardPerDay[m] + corridor.alightPerDay[m];
    const prob = parts.probability[m];
    const catchmentM = ((gapBeforeM ?? 0) + (gapAfterM ?? 0)) / 2;
    const local =
      detail && catchmentM > 0
        ? localOptimalSpacingM(demand.loadDepartingPerDay[m], ends / catchmentM, {
            walkSpeedMps: params.walk_speed_mps,
            lostTimePerStopS: prep.lostTimePerStopS * prob,
            walkWeight,
          })
        : null;
    const reason = prep.fixedReason[m];
    let verdict: Verdict = 'ok';
    let removal: ChangeEffect | null = null;
    if (reason !== '') {
      verdict = 'fixed';
      fixedStopIdx.push(stopIdx);
    } else {
      removal = changeEffect(parts.removal[m] as ChangeParts, settings, 1);
      const spacing = (gapBeforeM! + gapAfterM!) / 2;
      // close only when the spacing is below the band AND taking the stop out saves riders time: the band
      // uses the pattern's average demand, the removal figure this stop's own riders and neighbours
      if (hasOptimum && spacing < band.lowM && removal.netPaxMinPerDay < 0) verdict = 'close';
      else if (hasOptimum && spacing > band.highM && (wideGap(m - 1) || wideGap(m))) verdict = 'wide';
      removals.push({
        netPaxMinPerDay: removal.netPaxMinPerDay,
        walkAddedPaxMinPerDay: removal.walkAddedPaxMinPerDay,
        rideSavedPaxMinPerDay: removal.rideSavedPaxMinPerDay,
        runTimeSavedPerTripS: removal.runTimeSavedPerTripS,
        ridersAffectedPerDay: removal.ridersAffectedPerDay,
        patternId: pattern.id,
        routeId: pattern.routeId,
        tripsPerDay: pattern.tripsPerDay,
        stopIdx,
        modelPos: m,
        gapAfterRemovalM: gapBeforeM! + gapAfterM!,
      });
    }
    if (verdict === 'close') closeStops++;
    if (!detail) continue;
    stops.push(
      stopResult(stopBase(prep, j, stop), {
        gapBeforeM,
        gapAfterM,
        boardingsPerDay: corridor.boardPerDay[m],
        alightingsPerDay: corridor.alightPerDay[m],
        loadDepartingPerDay: demand.loadDepartingPerDay[m],
        stopProbability: prob,
        localOptimalSpacingM: local,
        verdict,
        stopVerdict: verdict === 'wide' ? 'ok' : verdict,
        gapBeforeVerdict: m > 0 ? gapVerdicts[m - 1] : null,
        gapAfterVerdict: m + 1 < n ? gapVerdicts[m] : null,
        fixedReason: reason,
        fixedNote: prep.fixedNote[m],
        keptByOptimiser: keptSet !== null && keptSet.has(m),
        removalNetPaxMinPerDay: removal ? removal.netPaxMinPerDay : null,
        removalRunTimeSavedS: removal ? removal.runTimeSavedPerTripS : null,
      }),
    );
  }
  return { stops, removals, fixedStopIdx, closeStops };
}

/** Scheduled seconds between model stops m and m+1 (median trip, dwell at skipped stops included); null when unknown. */
function scheduledGapS({ pattern, modelStops }: PreparedPattern, m: number): number | null {
  let scheduledS: number | null = 0;
  for (let j = modelStops[m]; j < modelStops[m + 1]; j++) {
    const t = pattern.gapRunTimeS[j] + (j > modelStops[m] ? (pattern.scheduledDwellS[j] ?? 0) : 0);
    scheduledS = Number.isFinite(t) && scheduledS !== null ? scheduledS + t : null;
  }
  return scheduledS;
}

/** Gaps: which are wide, the effect of a stop added in the middle of each wide one, and (with detail) each gap's row. */
function gapRows(
  feed: Feed,
  prep: PreparedPattern,
  params: ModelParams,
  parts: PatternParts,
  settings: CostSettings,
  { hasOptimum, band }: PatternOptimum,
  { detail, gapVerdicts }: { detail: boolean; gapVerdicts: GapVerdict[] },
): GapRows {
  const { pattern, modelStops, posM } = prep;
  const n = modelStops.length;
  const { gapsM, feedStopsByModelPos } = parts;
  const gaps: GapResult[] = [];
  const additions: AdditionEffect[] = [];
  let wideGaps = 0;
  for (let m = 0; m + 1 < n; m++) {
    const gapM = gapsM[m];
    // asked only above the band, where it decides: a short gap is not wide whoever serves it
    const aboveBand = hasOptimum && gapM > band.highM;
    const expressStretch = prep.expressGap[m] === true;
    const coveredByLocal = aboveBand && !expressStretch ? prep.gapLocalCover(m) : null;
    const wide = aboveBand && !expressStretch && coveredByLocal === null;
    const from = feed.stops[feedStopsByModelPos[m]];
    const to = feed.stops[feedStopsByModelPos[m + 1]];
    let add: ChangeEffect | null = null;
    let lat: number | null = null;
    let lon: number | null = null;
    if (wide) {
      wideGaps++;
      add = changeEffect((parts.addition[m] ??= additionParts(prep, m, (posM[m] + posM[m + 1]) / 2, settings)), settings, -1);
      lat = from && to ? (from.lat + to.lat) / 2 : null;
      lon = from && to ? (from.lon + to.lon) / 2 : null;
      const scheduledS = scheduledGapS(prep, m);
      additions.push({
        scheduledS,
        netPaxMinPerDay: add.netPaxMinPerDay,
        walkAddedPaxMinPerDay: add.walkAddedPaxMinPerDay,
        rideSavedPaxMinPerDay: add.rideSavedPaxMinPerDay,
        runTimeSavedPerTripS: add.runTimeSavedPerTripS,
        ridersAffectedPerDay: add.ridersAffectedPerDay,
        patternId: pattern.id,
        routeId: pattern.routeId,
        tripsPerDay: pattern.tripsPerDay,
        fromStopIdx: feedStopsByModelPos[m],
        toStopIdx: feedStopsByModelPos[m + 1],
        lat: lat ?? NaN,
        lon: lon ?? NaN,
        gapM,
      });
    }
    if (!detail) continue;
    gaps.push({
      patternId: pattern.id,
      fromStopIndex: modelStops[m],
      fromStopId: from?.id ?? '',
      toStopId: to?.id ?? '',
      gapM,
      verdict: gapVerdicts[m],
      wide,
      coveredByLocal,
      expressStretch,
      overMaxGap: gapM > params.max_gap_m,
      addNetPaxMinPerDay: add ? add.netPaxMinPerDay : null,
      addMidLat: lat,
      addMidLon: lon,
    });
  }
  return { gaps, additions, wideGaps };
}

/** The pattern's row: its fields, the optimum and band, the tallies of the stop and gap steps, riders' cost per trip today and at the optimum. */
function patternResult(
  prep: PreparedPattern,
  parts: PatternParts,
  { opt, hasOptimum, band, lawInput }: PatternOptimum,
  {
    best,
    paxMinLostPerDay,
    closeStops,
    wideGaps,
    costCurve,
  }: { best: OptimiseResult; paxMinLostPerDay: number; closeStops: number; wideGaps: number; costCurve: CostCurvePoint[] },
): PatternResult {
  const { pattern, posM, demand } = prep;
  const n = prep.modelStops.length;
  const lengthM = posM[n - 1] - posM[0];
  const meanGapM = parts.gapsM.length ? lengthM / parts.gapsM.length : 0;
  return {
    patternId: pattern.id,
    routeId: pattern.routeId,
    routeShortName: prep.routeShortName,
    routeType: prep.routeType,
    directionId: pattern.directionId,
    headsign: pattern.headsign,
    shapeId: pattern.shapeId,
    distanceSource: pattern.distanceSource,
    stopCount: pattern.stopIdx.length,
    lengthM: pattern.lengthM,
    tripsPerDay: pattern.tripsPerDay,
    medianGapM: parts.medianGapM,
    meanGapM,
    optimalSpacingM: hasOptimum ? opt.spacingM : 0,
    bandLowM: hasOptimum ? band.lowM : 0,
    bandHighM: hasOptimum ? band.highM : 0,
    closeStops,
    wideGaps,
    optimalStopCount: best.optimalStopCount + (pattern.stopIdx.length - n),
    paxMinLostPerDay,
    paxMinAdditionsPerDay: 0, // the audit fills it once the additions are chosen (runAudit)
    paxMinAtStakePerDay: paxMinLostPerDay,
    demandSource: demand.demandSource,
    lostTimeSource: prep.lostTimeSource,
    lostTimePerStopS: prep.lostTimePerStopS,
    cruiseSpeedMps: prep.cruiseSpeedMps,
    cruiseSpeedSource: prep.cruiseSpeedSource,
    trafficDelayS: prep.trafficDelayS,
    stoppingModel: prep.stoppingModel,
    meanTripLengthM: prep.meanTripLengthM,
    ridersPerDay: demand.ridersPerDay,
    runTimeS: pattern.runTimeS,
    costCurve,
    currentCostPerRiderS: hasOptimum && meanGapM > 0 ? costPerRiderS(meanGapM, lawInput) : 0,
    optimalCostPerRiderS: hasOptimum ? costPerRiderS(opt.spacingM, lawInput) : 0,
    path: pattern.path,
  };
}
