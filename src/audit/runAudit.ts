// The whole audit of a feed's patterns: parameters, demand, per-pattern model and verdicts, network
// candidates, sensitivity, and the AuditResult every report draws on (headline, parameters with their
// sources, plain-language assumptions, warnings).

import type { OnProgress } from '../common/progress.js';
import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from '../network/types.js';
import type { ObservedData } from '../realtime/types.js';
import { version } from '../version.js';
import type { AuditResult, Headline, LandUseSummary, ReviewGap } from './types.js';
import { FAST_STRETCH_MPS, MIN_PEOPLE_FOR_ADDITION, WALK_DETOUR, WALK_RADIUS_M } from './additionEvidence.js';
import type { LandUseLayer } from '../landuse/readLandUse.js';
import { densityGrid, peopleForNewStop, type Catchments } from '../model/catchments.js';
import type { CandidateOptions } from './candidates.js';
import { paramsReport, type ModelParams, type ParamsInput } from '../model/params.js';
import type { PreparedPattern } from '../model/preparePattern.js';
import type { WarningSink } from '../common/warnings.js';
import { BOARDING_TIME_PER_PAX_S, cruiseSpeedBoundsMps } from '../model/cruiseSpeed.js';
import { prepareAudit } from './prepareAudit.js';
import { typicalTripLengthM } from '../model/demand.js';
import { median } from '../common/median.js';
import { CAUTIONS } from './cautions.js';
import { analysePattern, patternParts, type PatternAnalysis } from './verdicts.js';
import { LOCAL_MIN_TRIP_SHARE, LOCAL_NEAR_M } from './localCover.js';
import { TRUNK_WINDOW } from './transfers.js';
import { EXPRESS_STRETCH_M } from './expressStretch.js';
import { CONTEXT_STATION_RADIUS_M, type StationPoint } from '../network/contextStations.js';
import { speedFamily } from '../gtfs/routeTypes.js';
import { optimiserPlan } from './plan.js';
import { PROGRAMME_WORK_LIMIT, programmeCandidates, programmeWork } from './programme.js';
import { buildCandidates } from './candidates.js';
import { additionsAtStake, wideGapCounts } from './headlineFigures.js';
import { meanOptimalSpacingM, runSensitivity, SENSITIVITY_TOP_CANDIDATES, sensitivityWalkWeights } from './sensitivity.js';

export interface RunAuditOptions {
  /** Parameters by name (the rest at their defaults; checked here), or what normalizeParams returned. */
  params?: ParamsInput;
  ridership?: string; // path of a ridership CSV
  keep?: string[]; // stop_ids that must stay
  observed?: ObservedData;
  onProgress?: OnProgress;
  /** Keep the network's transfer points (routes crossing, meeting or parting) as fixed (default true). */
  forceTransfers?: boolean;
  /** Stops within walking distance of another mode's station (stop index -> note), kept as transfer points. */
  stations?: ReadonlyMap<number, string>;
  /** The context feeds' stations (--context): a station within a walk of a wide gap's middle is evidence for an addition there. */
  contextStations?: readonly StationPoint[];
  /** Route ids to report (null or absent: all). Every figure is still computed on the whole network. */
  reportRoutes?: ReadonlySet<string> | null;
  /** Time stamp written into the result (default now); fixed in tests for reproducible output. */
  generatedAt?: string;
  /** A land-use layer (src/landuse/readLandUse.ts): catchments, coverage, and the evidence for additions. */
  landUse?: LandUseLayer;
}

/** The parameters' values, sources and notes where a pattern's own choice stands in for the set value. */
type ParamOverrides = Parameters<typeof paramsReport>[1];

/** The land-use layer's figures for the result. */
function landUseSummary(c: Catchments): LandUseSummary {
  const { layer } = c;
  return {
    file: layer.file,
    format: layer.format,
    columns: layer.columns.map((col, i) => ({ name: col.name, weight: col.weight, total: layer.totals[i], covered: c.coveredAmounts[i] })),
    features: layer.features,
    featuresOutsideCatchments: c.featuresOutside,
    points: layer.lat.length,
    people: layer.totalPeople,
    peopleCovered: c.coveredPeople,
    walkRadiusM: WALK_RADIUS_M,
    walkDetour: WALK_DETOUR,
    density: densityGrid(c),
  };
}

function countBy(values: string[]): Map<string, number> {
  const m = new Map<string, number>();
  for (const v of values) m.set(v, (m.get(v) ?? 0) + 1);
  return m;
}

/** The assumptions line on when a bus stops, naming what each pattern used. */
function stoppingAssumption(param: string, used: string[]): string {
  const models = new Set(used);
  const parts: string[] = [];
  if (models.has('always'))
    parts.push(
      param === 'always'
        ? 'The bus is assumed to stop at every stop (as set).'
        : 'Where demand is assumed, the bus is assumed to stop at every stop: a chance of skipping a stop is only as good as the counts behind it.',
    );
  if (models.has('poisson'))
    parts.push(
      'A bus stops at a stop only when someone boards or alights there: probability 1 - exp(-riders per trip), Poisson (it overstates stopping somewhat).',
    );
  if (models.has('observed'))
    parts.push(
      'Where realtime data covers a pattern, the observed share of trips stopping at each stop is used; a stop without one is served on assumed demand and follows Poisson on counted demand, as without the archive.',
    );
  return parts.join(' ') || 'No pattern was modelled.';
}

export function runAudit(feed: Feed, patterns: PatternSet, options: RunAuditOptions = {}): AuditResult {
  const {
    params: rawParams,
    ridership,
    keep = [],
    observed,
    onProgress,
    forceTransfers = true,
    generatedAt = new Date().toISOString(),
    reportRoutes = null,
    stations,
    contextStations = [],
    landUse,
  } = options;
  const { np, params, preps, warnings, catchments } = prepareAudit(feed, patterns, {
    params: rawParams,
    ridership,
    keep,
    observed,
    onProgress,
    forceTransfers,
    stations,
    landUse,
  });

  onProgress?.({ stage: 'verdicts' });
  // what no walk weight changes, once per pattern for the base audit and the sensitivity cases
  const walkWeights = sensitivityWalkWeights(params);
  const parts = preps.map((p) => patternParts(p, params, walkWeights));
  const analyses = preps.map((p, i) => analysePattern(feed, p, params, { parts: parts[i] }));
  // what the realtime archive said, beside the figures it fed (or, where a set value won, did not)
  analyses.forEach((a, i) => (a.result.observed = preps[i].observedFigures));
  if (catchments) for (const a of analyses) a.result.peopleCovered = catchments.coveredByPattern.get(a.result.patternId) ?? 0;
  const reviewGaps: ReviewGap[] = [];
  // what candidates are built with besides the walking policy: the evidence for additions (context stations, land use)
  const candidateOptions: Omit<CandidateOptions, 'maxGapM' | 'reviewGaps'> = catchments
    ? {
        contextStations,
        peopleNear: (lat, lon) => peopleForNewStop(catchments, lat, lon),
        onlyStopPeople: (s) => catchments.onlyStop.get(s) ?? 0,
      }
    : { contextStations };
  const generated = buildCandidates(feed, analyses, { ...candidateOptions, maxGapM: params.max_gap_m, reviewGaps });
  // what is reported: the routes asked for; everything above was computed on the whole network
  const shownRoute = (routeId: string) => reportRoutes === null || reportRoutes.has(routeId);
  const shown = analyses.filter((a) => shownRoute(a.result.routeId));
  warnShownPatterns(shown, warnings);
  // the ranked list as a programme: each figure the candidate's effect given those ranked above it
  onProgress?.({ stage: 'programme' });
  const joint = programmeWork(preps, generated) <= PROGRAMME_WORK_LIMIT;
  const candidates = joint ? programmeCandidates(feed, patterns.date, preps, params, generated) : generated;
  if (!joint) warnings.add('candidates-weighed-alone', `${generated.length} candidates`);
  // the cases, and robustness judged on the programme as accepted (its candidates' robust set there)
  onProgress?.({ stage: 'sensitivity' });
  const { cases } = runSensitivity(feed, preps, params, generated, {
    baseAnalyses: analyses,
    parts,
    reported: shownRoute,
    programme: candidates,
    candidateOptions,
  });
  // what the accepted additions have at stake on each pattern, beside the optimiser's removals
  const adds = additionsAtStake(feed, patterns.date, preps, params, candidates);
  for (const a of analyses) {
    a.result.paxMinAdditionsPerDay = adds.get(a.result.patternId) ?? 0;
    a.result.paxMinAtStakePerDay = a.result.paxMinLostPerDay + a.result.paxMinAdditionsPerDay;
  }
  // a candidate is reported when it touches a route asked for, with its figures over every route it touches
  const shownCandidates = reportRoutes === null ? candidates : candidates.filter((c) => c.routeIds.some(shownRoute));
  shownCandidates.forEach((c, i) => (c.rank = i + 1));

  // the optimiser's plan over the whole network, weighed jointly by the scenario engine on this preparation
  onProgress?.({ stage: 'plan' });
  const plan = optimiserPlan(
    feed,
    patterns.date,
    preps,
    params,
    analyses.flatMap((a) => a.stops),
  );

  const headline = headlineOf(shown);
  const anyObservedLost = preps.some((p) => p.lostTimeSource === 'observed');
  const overrides = paramOverrides(params, preps, ridership);
  const demandSource = ridership !== undefined ? 'observed' : catchments ? 'land-use' : 'assumed';
  const assumptions = auditAssumptions(params, preps, {
    demandSource,
    ridership,
    anyObservedLost,
    catchments,
    contextStations,
    stations,
    forceTransfers,
    joint,
    reported: reportRoutes === null ? null : { shown: shown.length, of: analyses.length },
  });

  return {
    tool: { name: 'stopspan', version },
    feed: {
      source: feed.source,
      contentHash: feed.contentHash,
      version: feed.feedInfo?.version ?? '',
      publisher: feed.feedInfo?.publisherName || feed.agencies[0]?.name || '',
    },
    date: patterns.date,
    generatedAt,
    demandSource,
    lostTimeSource: anyObservedLost ? 'observed' : 'default',
    params: paramsReport(np, overrides),
    headline,
    patterns: shown.map((a) => a.result),
    stops: shown.flatMap((a) => a.stops),
    plan,
    gaps: shown.flatMap((a) => a.gaps),
    candidates: shownCandidates,
    reviewGaps: reviewGaps.filter((g) => g.routeIds.some(shownRoute)),
    sensitivity: cases,
    warnings: [...feed.warnings, ...(patterns.warnings ?? []), ...(observed?.warnings ?? []), ...warnings.list()],
    assumptions,
    landUse: catchments ? landUseSummary(catchments) : null,
    observed: observed
      ? {
          source: observed.source,
          snapshotsRead: observed.snapshotsRead,
          snapshotsSkipped: observed.snapshotsSkipped,
          tripsMatched: observed.tripsMatched,
          tripsUnmatched: observed.tripsUnmatched,
        }
      : null,
  };
}

/** Warnings on the patterns reported: a mode the bus model does not fit, express stretches, gaps a local serves. */
function warnShownPatterns(shown: PatternAnalysis[], warnings: WarningSink): void {
  for (const a of shown) {
    const family = speedFamily(a.result.routeType);
    if (family !== 'bus' && family !== 'tram') {
      warnings.add('bus-model-off-street', `${a.result.patternId} (${family})`);
    }
    for (const g of a.gaps) {
      if (g.expressStretch && a.result.optimalSpacingM > 0 && g.gapM > a.result.bandHighM) {
        warnings.add('express-stretch', `${a.result.patternId} ${g.fromStopId}-${g.toStopId} (${Math.round(g.gapM)} m)`, 1, {
          stretchM: EXPRESS_STRETCH_M,
        });
      }
      if (g.coveredByLocal === null || !(a.result.optimalSpacingM > 0) || g.gapM <= a.result.bandHighM) continue;
      warnings.add('gap-served-by-local', `${a.result.patternId} ${g.fromStopId}-${g.toStopId} (local ${g.coveredByLocal})`);
    }
  }
}

/** The headline: the reported patterns' counts and sums; gaps and stops served counted once. */
function headlineOf(shown: PatternAnalysis[]): Headline {
  const allGaps: number[] = [];
  const served = new Set<number>();
  for (const a of shown) {
    for (let m = 0; m + 1 < a.modelPosM.length; m++) allGaps.push(a.modelPosM[m + 1] - a.modelPosM[m]);
    for (const s of a.result.patternId ? a.feedStopsByModelPos : []) served.add(s);
  }
  const wide = wideGapCounts(shown);
  return {
    patterns: shown.length,
    stops: served.size,
    trips: shown.reduce((n, a) => n + a.result.tripsPerDay, 0),
    medianGapM: median(allGaps, 0),
    meanOptimalSpacingM: meanOptimalSpacingM(shown),
    closeStops: shown.reduce((n, a) => n + a.result.closeStops, 0),
    wideGaps: wide.distinct,
    wideGapsOnPatterns: wide.onPatterns,
    paxMinLostPerDay: shown.reduce((n, a) => n + a.result.paxMinLostPerDay, 0),
    paxMinAdditionsPerDay: shown.reduce((n, a) => n + a.result.paxMinAdditionsPerDay, 0),
    paxMinAtStakePerDay: shown.reduce((n, a) => n + a.result.paxMinAtStakePerDay, 0),
  };
}

/** Parameters with what was actually used where a value is per pattern (cruise speed, stopping model, mean trip length). */
function paramOverrides(params: Readonly<ModelParams>, preps: PreparedPattern[], ridership: string | undefined): ParamOverrides {
  const speeds = preps.map((p) => p.cruiseSpeedMps);
  const trips = preps.map((p) => p.meanTripLengthM);
  const overrides: ParamOverrides = {};
  if (params.cruise_speed_mps === null) {
    const sources = new Set(preps.map((p) => p.cruiseSpeedSource));
    overrides.cruise_speed_mps = {
      value: null,
      source: sources.has('observed') ? 'observed' : 'estimated',
      note: `${sources.has('observed') ? 'observed where realtime data covers a pattern, else ' : ''}estimated per pattern from the schedule: median ${median(speeds, 0).toFixed(1)} m/s (range ${Math.min(...speeds).toFixed(1)}-${Math.max(...speeds).toFixed(1)})`,
    };
  }
  if (params.stopping_model === 'auto') {
    const used = countBy(preps.map((p) => p.stoppingModel));
    overrides.stopping_model = {
      value: 'auto',
      source: 'D',
      note: `chosen per pattern by the data it has (observed stop shares, else Poisson on counted demand, else every stop served): ${[...used].map(([m, n]) => `${m} on ${n}`).join(', ') || 'no patterns'}`,
    };
  }
  if (params.mean_trip_length_m === null) {
    overrides.mean_trip_length_m = {
      value: null,
      source: ridership !== undefined ? 'observed' : 'S',
      note: `${ridership !== undefined ? 'from the ridership load profile' : `typical for the route type (bus ${Math.round(typicalTripLengthM(3))} m), truncated by each pattern's ends`}: median ${Math.round(median(trips, 0))} m`,
    };
  }
  return overrides;
}

/** What an assumptions line names besides the parameters and the patterns' own choices. */
interface AssumptionFacts {
  demandSource: AuditResult['demandSource'];
  ridership: string | undefined;
  anyObservedLost: boolean;
  catchments: Catchments | null;
  contextStations: readonly StationPoint[];
  stations: ReadonlyMap<number, string> | undefined;
  forceTransfers: boolean;
  joint: boolean; // the candidates weighed as a programme
  reported: { shown: number; of: number } | null; // patterns reported of all, when routes were asked for
}

/** The plain-language assumptions: demand, cruise speed, lost time, stopping, locals, land use, evidence, fixed stops, the band, the figures, then the cautions. */
function auditAssumptions(
  params: Readonly<ModelParams>,
  preps: PreparedPattern[],
  { demandSource, ridership, anyObservedLost, catchments, contextStations, stations, forceTransfers, joint, reported }: AssumptionFacts,
): string[] {
  return [
    demandSource !== 'observed'
      ? `No ridership file: demand is assumed at ${params.assumed_boardings_per_trip_km} boardings per trip per km, trip ends spread evenly along each pattern, riders' trip lengths exponential with a mean of ${params.mean_trip_length_m !== null ? `${params.mean_trip_length_m} m (as set)` : `the route type's typical trip (city bus ${Math.round(typicalTripLengthM(3))} m, from memory)`}, truncated by the pattern's ends (a pattern too short for that mean holds what fits, counted in the warnings); ${demandSource === 'land-use' ? `each stop's share of its pattern's trip ends follows the people (land use) in its catchment, so a stop with nobody in it has none; every figure from it is marked demand_source=land-use` : 'every figure from it is marked demand_source=assumed'}.`
      : `Demand comes from the ridership file ${ridership}; a stop's counts are split between the patterns serving it by trips per day.`,
    params.cruise_speed_mps === null
      ? `Cruise speed is estimated per pattern from the schedule: the slowest cruise that keeps to the scheduled run time given the stops served and boarding (${BOARDING_TIME_PER_PAX_S} s per boarding, Levinson 1983), or the route type's typical cruise speed (bus ${cruiseSpeedBoundsMps(3).typicalMps.toFixed(1)} m/s, 25 mph) when the schedule is slower than that, or faster than any plausible speed explains (warning schedule-too-fast); the rest of a slow schedule is taken as traffic and signal delay (traffic_delay_s in patterns.csv), not as slow cruising.`
      : `Cruise speed is ${params.cruise_speed_mps} m/s on every pattern, as set.`,
    `Lost time per stop served = door time ${params.door_time_s} s + braking and accelerating from cruise speed at ${params.decel_mps2} and ${params.accel_mps2} m/s2 + re-entry delay ${params.reentry_delay_s} s${anyObservedLost ? ' (observed from realtime data where available)' : ''}.`,
    stoppingAssumption(
      params.stopping_model,
      preps.map((p) => p.stoppingModel),
    ),
    `A gap that another route, or a local pattern of the same route and direction, serves as a local (it calls within ${LOCAL_NEAR_M} m of both ends, in order, with stops of its own between them, and runs at least ${LOCAL_MIN_TRIP_SHARE * 100} % as many trips) is not flagged wide and gets no proposed stop: the limited-stop service runs past those riders by design.`,
    ...(catchments
      ? [
          `Land use (${catchments.layer.file}): each person (${catchments.layer.columns.map((c) => `${c.name} x ${c.weight}`).join(', ')}) walks to the nearest stop within a ${WALK_RADIUS_M} m walk (straight line times ${WALK_DETOUR}); a polygon's people are spread evenly over its area (a small block at its centroid). Coverage is the people within that walk of a stop served; ${Math.round(catchments.coveredPeople)} of ${Math.round(catchments.layer.totalPeople)} are covered, ${catchments.featuresOutside} of ${catchments.layer.features} features touch no catchment. A stop is proposed in a wide gap only where at least ${MIN_PEOPLE_FOR_ADDITION} people would walk to it first, on a stretch the schedule runs no faster than ${Math.round(FAST_STRETCH_MPS * 3.6)} km/h; other wide gaps are listed for review.`,
        ]
      : []),
    `A stop is proposed in a wide gap only with evidence that people are there and a bus can stop there${catchments ? ' (without a land-use layer)' : ''}: a stop of any route${contextStations.length > 0 ? ' or a station of a context feed' : ''} within a ${WALK_RADIUS_M} m walk (straight line times ${WALK_DETOUR}) of the site, in the middle of the gap rather than by its ends, on a stretch the schedule runs no faster than ${Math.round(FAST_STRETCH_MPS * 3.6)} km/h; other wide gaps are listed for review with their length and reason and no passenger-minute figure.`,
    "Riders are spread evenly over each stop's catchment (midpoint to midpoint along the route) and walk along the route to the nearest stop; street grids, crossings and barriers are not modelled.",
    `Terminals, the keep-list${forceTransfers ? ', transfer points (where routes cross, or meet and part: fixed_note names them)' : ''} and timepoints (where a pattern marks only some stops) are never proposed for removal; no proposal opens a gap above ${params.max_gap_m} m.`,
    ...(stations && stations.size > 0
      ? [
          `${stations.size} stops within ${CONTEXT_STATION_RADIUS_M} m of a station of a context feed (another mode given with --context) are transfer points and are kept (fixed_reason station, fixed_note naming it).`,
        ]
      : []),
    `A gap of ${EXPRESS_STRETCH_M} m or more that the schedule runs at the route type's typical cruise speed or faster (an express or commuter run no local makes), and every gap of a route typed express or coach (route_type 702, 200-299), is left out of the spacing verdicts: not flagged wide, no stop proposed (warning express-stretch).`,
    `A stop where routes run together (the stops before and after it are theirs too, within ${TRUNK_WINDOW} stops, so a limited-stop route along a local counts) is a trunk stop: its removal is one candidate, weighed over every pattern serving it, each with its own gaps and walking limit.`,
    `A stop is close, or a gap wide, only outside the band of spacings costing riders at most ${(params.band_tolerance * 100).toFixed(0)} % more than the optimum; sensitivity repeats the audit at walk weights 1.5 and 2.5 and band tolerances 5 % and 10 %, and a candidate is robust when, in the ranked list as accepted and weighed again in the same order in each case, it still saves riders time given those ranked above it (candidatesKept compares the top ${SENSITIVITY_TOP_CANDIDATES}).`,
    `Net passenger-minutes per day = walk added (weighted) - ride time saved by riders on board + the neighbours' extra stopping; negative means riders save time. ${joint ? 'Each candidate is weighed given those ranked above it, so any prefix of the list adds up.' : 'The candidates are each weighed alone (too many to weigh as a programme) and do not simply add.'}`,
    `Passenger-minutes at stake: removals (the optimiser's drops, today's cost minus its optimum) and additions (the proposed stops in wide gaps, weighed together on each pattern) are shown apart and added together; wide gaps are counted once per pair of stops, however many patterns run them, with the count per pattern beside it. Timing points where no one boards or alights are not stops for spacing: gaps, verdicts, candidates and the optimiser run past them.`,
    ...(reported === null
      ? []
      : [
          `Reported: ${reported.shown} of ${reported.of} patterns (the routes asked for); every figure, transfer, trunk and local is computed on the whole network, so a route's verdicts are the same whichever routes are reported, and a candidate touching a reported route is shown with its effect on every route it touches.`,
        ]),
    ...CAUTIONS,
  ];
}
