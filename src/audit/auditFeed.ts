// The whole audit as one library call: read the feed, build patterns, optionally read observed data,
// run the model. Returns the result and the intermediate stages; writes nothing.

import type { OnProgress } from '../common/progress.js';
import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from '../network/types.js';
import type { ObservedData } from '../realtime/types.js';
import type { AuditResult } from './types.js';
import { loadDayNetwork } from '../network/loadNetwork.js';
import type { FetchOptions } from '../gtfs/download.js';
import { StopspanError } from '../common/errors.js';
import { selectedRoutes } from './routeSelection.js';
import { contextStops } from '../network/contextStations.js';
import { normalizeParams, type ParamsInput } from '../model/params.js';
import type { LandUseColumn } from '../landuse/readLandUse.js';
import { readLandUseAside } from '../landuse/readLandUseAside.js';

export interface AuditFeedOptions {
  date?: string; // YYYY-MM-DD; default: the weekday in the feed's range with the most trips
  routes?: string[]; // routes reported (the whole network is still read and modelled)
  excludeRoutes?: string[]; // routes not reported
  routeTypes?: string[]; // route types reported (route_type numbers or families: bus, tram, metro, rail, ...)
  params?: ParamsInput; // parameters by name, the rest at their defaults (checked once, by the model)
  ridership?: string; // path of a ridership CSV
  observed?: string; // path of a GTFS-Realtime archive (zip or folder)
  keep?: string[]; // stop ids the optimiser must keep
  context?: string[]; // other feeds (zip, folder or URL) whose stations make nearby stops transfer points
  landUse?: string; // path of a land-use layer (CSV points or GeoJSON)
  landUseColumns?: LandUseColumn[] | null; // its numeric columns and weights (default population and jobs, 1 each)
  onProgress?: OnProgress;
  /** Headers, cache and proxy settings of a download, for a feed given as a URL (context feeds get no headers). */
  fetch?: FetchOptions;
}

export interface AuditFeedOutput {
  feed: Feed;
  patterns: PatternSet;
  observed: ObservedData | null;
  result: AuditResult;
}

export async function auditFeed(source: string, options: AuditFeedOptions = {}): Promise<AuditFeedOutput> {
  const {
    date,
    routes,
    excludeRoutes,
    routeTypes,
    params,
    ridership,
    observed: observedPath,
    keep,
    onProgress,
    context = [],
    landUse: landUsePath,
    landUseColumns = null,
    fetch,
  } = options;
  if (date !== undefined && !/^\d{4}-\d{2}-\d{2}$/.test(date)) {
    throw new StopspanError('bad-option', 'invalid option --date: expected YYYY-MM-DD', { value: date });
  }
  // checked before the feed is read, so a bad parameter costs no reading; runAudit takes them as they are
  const checkedParams = normalizeParams(params);
  // the land-use layer is read on a worker thread while the feed is read (readLandUseAside.ts)
  const landUseRead = landUsePath !== undefined ? readLandUseAside(landUsePath, { columns: landUseColumns }) : undefined;
  landUseRead?.catch(() => undefined); // a failure surfaces at the await below
  // the model loads while the feed is read, not before: the module loader reads each file through the
  // thread pool, and that waiting then overlaps the reading instead of delaying its start
  const stages = import('./runAudit.js');
  stages.catch(() => undefined); // a failure to load surfaces at the await below
  // the whole feed is read and modelled whatever is reported: transfers, trunks and locals are other
  // routes' stops, so a route's figures must not depend on which others were asked for
  const { feed, patterns } = await loadDayNetwork(source, { date, onProgress, fetch });
  const reportRoutes = selectedRoutes(feed, { routes, excludeRoutes, routeTypes });
  const { runAudit } = await stages;
  if (reportRoutes !== null && !patterns.patterns.some((p) => reportRoutes.has(p.routeId))) {
    throw new StopspanError('empty-feed', `no route patterns run on ${patterns.date} for the routes asked for`, { file: 'trips.txt' });
  }
  // context feeds: their stations only (no stop_times), each stop near one kept as a transfer point
  const { near: stations, stations: contextStations } = await contextStops(feed, patterns, context, fetch);
  const landUse = await landUseRead;
  // the realtime reader (and its protobuf library) loads only when an archive is given
  const observed = observedPath
    ? await (await import('../realtime/calibrate.js')).observeArchive(observedPath, feed, patterns, { onProgress })
    : null;
  const result = await runAudit(feed, patterns, {
    params: checkedParams,
    ridership,
    keep,
    observed: observed ?? undefined,
    onProgress,
    reportRoutes,
    stations,
    contextStations,
    landUse,
  });
  return { feed, patterns, observed, result };
}
