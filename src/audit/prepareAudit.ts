// The shared first half of an audit and a what-if: parameters normalised once, the keep-list checked,
// demand per pattern (ridership file, else assumed riders placed by a land-use layer's people, else assumed
// spread evenly), the land-use catchments, and every pattern prepared for the model.

import { StopspanError } from '../common/errors.js';
import type { OnProgress } from '../common/progress.js';
import { WarningSink } from '../common/warnings.js';
import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from '../network/types.js';
import type { ObservedData } from '../realtime/types.js';
import { assumedDemand, ridershipDemand, typicalTripLengthM, type PatternDemand } from '../model/demand.js';
import { normalizeParams, type ModelParams, type NormalizedParams, type ParamsInput } from '../model/params.js';
import { preparePattern, type PreparedPattern } from '../model/preparePattern.js';
import { loadRidership } from '../model/ridership.js';
import { localCoverByGap } from './localCover.js';
import { transferPoints } from './transfers.js';
import { expressStretches } from './expressStretch.js';
import { buildCatchments, type Catchments } from '../model/catchments.js';
import type { LandUseLayer } from '../landuse/readLandUse.js';

export interface PrepareAuditOptions {
  /** Parameters by name (the rest at their defaults), or what normalizeParams returned. */
  params?: ParamsInput;
  ridership?: string;
  keep?: string[];
  observed?: ObservedData;
  onProgress?: OnProgress;
  /** Keep the network's transfer points (routes crossing, meeting or parting) as fixed (default true). */
  forceTransfers?: boolean;
  /** Stops within walking distance of another mode's station (stop index -> note naming it), from --context. */
  stations?: ReadonlyMap<number, string>;
  /** A land-use layer (readLandUse): catchments and coverage; without a ridership file, demand follows its people. */
  landUse?: LandUseLayer;
}

export interface PreparedAudit {
  np: NormalizedParams;
  params: Readonly<ModelParams>;
  preps: PreparedPattern[];
  warnings: WarningSink;
  /** The land-use catchments and coverage, or null without a land-use layer. */
  catchments: Catchments | null;
}

export function prepareAudit(
  feed: Feed,
  patterns: PatternSet,
  { params: rawParams, ridership, keep = [], observed, onProgress, forceTransfers = true, stations, landUse }: PrepareAuditOptions = {},
): PreparedAudit {
  // the one place a library call's parameters are checked (the command's come checked, and pass as they are)
  const np = normalizeParams(rawParams);
  const params = np.values;
  if (!Array.isArray(keep) || keep.some((k) => typeof k !== 'string'))
    throw new StopspanError('bad-option', 'invalid option keep: expected a list of stop_ids', { value: String(keep) });
  for (const id of keep) {
    if (!feed.stopIndex.has(id))
      throw new StopspanError('bad-option', `invalid option keep: unknown stop_id ${id}`, { column: 'keep', value: id });
  }
  if (patterns.patterns.length === 0)
    throw new StopspanError('empty-feed', `no patterns to analyse on ${patterns.date}`, { file: feed.source });
  const warnings = new WarningSink();

  onProgress?.({ stage: 'demand' });
  const layouts = patterns.patterns.map((pattern) => {
    const modelStops: number[] = [];
    for (let j = 0; j < pattern.stopIdx.length; j++) if (pattern.passengerStop[j] !== false) modelStops.push(j);
    return { pattern, modelStops, posM: modelStops.map((j) => pattern.distAlongM[j]) };
  });
  const catchments = landUse
    ? buildCatchments(
        landUse,
        feed,
        layouts
          .filter((l) => l.modelStops.length >= 2)
          .map((l) => ({ patternId: l.pattern.id, stops: l.modelStops.map((j) => l.pattern.stopIdx[j]) })),
      )
    : null;
  let observedDemand: Map<string, PatternDemand> | null = null;
  if (ridership !== undefined) {
    const rows = loadRidership(ridership, feed, { warnings });
    observedDemand = ridershipDemand(
      rows,
      layouts.filter((l) => l.modelStops.length >= 2),
      { warnings },
    );
    if (params.mean_trip_length_m !== null) {
      warnings.add('mean-trip-from-counts', undefined, 1, { meanTripLengthM: params.mean_trip_length_m });
    }
  }

  const keepSet = new Set(keep);
  const transfers = forceTransfers ? transferPoints(feed, patterns) : new Map<number, string>();
  const given = new Set(np.given);
  const preps: PreparedPattern[] = [];
  patterns.patterns.forEach((pattern, i) => {
    onProgress?.({ stage: 'model', done: i, total: patterns.patterns.length, unit: 'patterns' });
    const prep = preparePattern(
      feed,
      patterns,
      pattern,
      (modelStops, posM) =>
        observedDemand?.get(pattern.id) ??
        assumedDemand(pattern.id, posM, pattern.tripsPerDay, {
          boardingsPerTripKm: params.assumed_boardings_per_trip_km,
          catchmentHalfMaxM: params.max_gap_m / 2,
          meanTripM: params.mean_trip_length_m ?? typicalTripLengthM(feed.routes.get(pattern.routeId)?.type ?? 3),
          peopleAtStops: catchments?.peopleAtStops.get(pattern.id),
        }),
      params,
      { keep: keepSet, observed: observed?.byPattern.get(pattern.id), warnings, transfers, stations, given },
    );
    if (prep) preps.push(prep);
  });
  if (preps.length === 0) throw new StopspanError('empty-feed', 'no pattern has two or more passenger stops', { file: feed.source });
  localCoverByGap(feed, patterns, preps).forEach((cover, i) => (preps[i].gapLocalCover = cover));
  for (const p of preps) p.expressGap = expressStretches(p);
  return { np, params, preps, warnings, catchments };
}
