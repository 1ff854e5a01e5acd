// `stopspan audit FEED`: the whole audit, written as reports into a folder.

import { isoToGtfsDate } from '../gtfs/calendar.js';
import type { Command } from 'commander';
import { terminalText } from '../common/terminalText.js';
import path from 'node:path';
import { auditFeed } from '../audit/auditFeed.js';
import { loadParams } from '../model/params.js';
import { StopspanError } from '../common/errors.js';
import { groupedFixed } from '../report/numberText.js';
import { EXIT, listOption, makeProgress, runAction, repeatedOption } from './shared.js';
import { paramOverrides, addParamOptions } from './paramOptions.js';
import { addFeedOptions, feedFetchOptions, type FeedFetchCliOptions } from './feedOptions.js';
import { parseLandUseWeights } from '../landuse/readLandUse.js';

const FORMATS = ['html', 'csv', 'geojson', 'json', 'gpkg'] as const;
type Format = (typeof FORMATS)[number];
/** Without --format: all but gpkg, which needs the optional SQLite binding. */
const DEFAULT_FORMATS: Format[] = ['html', 'csv', 'geojson', 'json'];

interface AuditOpts extends FeedFetchCliOptions {
  date?: string;
  out?: string;
  routes?: string[];
  excludeRoutes?: string[];
  routeTypes?: string[];
  params?: string;
  ridership?: string;
  landUse?: string;
  landUseWeights?: string;
  observed?: string;
  keep?: string[];
  context?: string[];
  format?: string[];
  units: string;
  force?: boolean;
  history?: string;
  json?: boolean | string;
  quiet?: boolean;
  verbose?: boolean;
  [k: string]: unknown;
}

export function registerAudit(program: Command): void {
  const cmd = program
    .command('audit')
    .description('audit stop spacing on every route pattern of a GTFS feed and write reports')
    .argument('<feed>', 'GTFS feed: a .zip file, a folder of .txt files, or an http(s) URL')
    .option('--date <YYYY-MM-DD>', 'analysis date (default: the weekday in the feed with the most trips)')
    .option('--out <dir>', 'output folder (default: reports/<feed name>)')
    .option(
      '--routes <ids>',
      'report only these route_ids or short names (comma-separated); the whole network is still modelled',
      listOption,
    )
    .option('--exclude-routes <ids>', 'do not report these route_ids or short names (comma-separated)', listOption)
    .option(
      '--route-types <types>',
      'report only routes of these types: GTFS route_type numbers or bus, tram, metro, rail, ferry, cable, other (comma-separated)',
      listOption,
    )
    .option('--params <file.json>', 'model parameters (every key optional; see README)')
    .option('--ridership <file.csv>', 'stop-level boardings and alightings per day')
    .option(
      '--land-use <file>',
      'where people live and work: CSV (lat, lon and counts) or GeoJSON points and polygons; catchments, coverage and, without --ridership, demand follow it',
    )
    .option(
      '--land-use-weights <list>',
      'the land-use columns read and their weights, as column=weight,... (default population=1,jobs=1, whichever the file has)',
    )
    .option('--observed <archive>', 'GTFS-Realtime archive (zip or folder) for observed dwell, speed and stopping')
    .option(
      '--context <feed>',
      'another feed (zip, folder or URL; repeatable) whose stations make bus stops within 150 m transfer points',
      repeatedOption,
    )
    .option('--keep <stop_ids>', 'stops the optimiser must keep (comma-separated)', listOption)
    .option('--format <list>', `outputs to write: ${FORMATS.join(',')} (default: ${DEFAULT_FORMATS.join(',')})`, listOption)
    .option('--units <system>', 'units people read: metric or imperial', 'metric')
    .option('--force', 'replace the output folder if it exists')
    .option('--history <file.sqlite>', 'append this run to a history database')
    .option(
      '--json [detail]',
      'print summary.json (schema/summary.schema.json) on stdout instead of the text summary; --json=full adds every row of patterns.csv, stops.csv and candidates.csv; the reports are still written',
    )
    .option('-q, --quiet', 'no progress on stderr')
    .option('--verbose', 'stack traces for internal errors');
  addParamOptions(cmd);
  addFeedOptions(cmd);
  cmd.action(async (feedArg: string, opts: AuditOpts) => {
    await runAction(
      Boolean(opts.verbose),
      async () => {
        if (typeof opts.json === 'string' && opts.json !== 'full')
          throw new StopspanError('bad-option', `invalid option --json: expected nothing or =full, got ${opts.json}`, { value: opts.json });
        const formats = checkFormats(opts.format);
        const fetch = feedFetchOptions(opts);
        // the GeoPackage's SQLite binding is optional: without it the run stops here, before the feed is read
        if (formats.includes('gpkg')) (await import('../report/gpkg.js')).loadGeoPackageSqlite();
        if (opts.units !== 'metric' && opts.units !== 'imperial') {
          throw new StopspanError('bad-option', 'invalid option --units: expected metric or imperial', { value: opts.units });
        }
        if (opts.date !== undefined) isoToGtfsDate(opts.date, '--date'); // the one date rule, before anything is read
        const outDir = opts.out ?? path.join('reports', feedName(feedArg));
        const params = loadParams(opts.params, paramOverrides(opts));
        const force = Boolean(opts.force);
        const inputs = [feedArg, opts.params, opts.ridership, opts.landUse, opts.observed, opts.history, ...(opts.context ?? [])];
        if (opts.landUseWeights !== undefined && opts.landUse === undefined)
          throw new StopspanError('bad-option', 'option --land-use-weights needs --land-use', { value: opts.landUseWeights });
        const landUseColumns = opts.landUseWeights !== undefined ? parseLandUseWeights(opts.landUseWeights) : null;
        // where the report goes and the history it joins are checked before the feed is read, so a run that
        // cannot save its work fails at once instead of after the whole audit
        await (await import('../report/writeFolder.js')).checkOutFolder(outDir, { force, inputs });
        // loaded only when asked for: the SQLite binding costs start-up time on every other run
        const history = opts.history ? await import('../history/index.js') : undefined;
        const db = history && opts.history ? history.openHistory(opts.history) : undefined;
        const progress = makeProgress(Boolean(opts.quiet) || Boolean(opts.json));
        // the report writers load while the feed is read (see auditFeed)
        const report = import('../report/writeReport.js');
        report.catch(() => undefined); // a failure to load surfaces at the await below
        try {
          const { result } = await auditFeed(feedArg, {
            date: opts.date,
            routes: opts.routes,
            excludeRoutes: opts.excludeRoutes,
            routeTypes: opts.routeTypes,
            params,
            ridership: opts.ridership,
            landUse: opts.landUse,
            landUseColumns,
            observed: opts.observed,
            keep: opts.keep,
            context: opts.context,
            onProgress: progress.onProgress,
            fetch,
          });
          progress.onProgress?.({ stage: 'writing reports' });
          const { writeReport } = await report;
          const written = await writeReport(result, outDir, { formats, units: opts.units, force, inputs });
          if (history && db) history.recordRun(db, history.auditRunRow(result));
          progress.done();
          if (opts.json) {
            const { fullJson, summaryJson } = await report;
            process.stdout.write(opts.json === 'full' ? fullJson(result) : summaryJson(result));
            return EXIT.clean;
          }
          const h = result.headline;
          process.stdout.write(
            `${terminalText(result.feed.source)} on ${result.date}: ${h.patterns} patterns, ${h.stops} stops, median gap ${Math.round(h.medianGapM)} m, ` +
              `modelled optimum ${Math.round(h.meanOptimalSpacingM)} m (${result.demandSource} demand)\n` +
              `${h.closeStops} close stops, ${h.wideGaps} wide gaps (${h.wideGapsOnPatterns} on patterns), ${groupedFixed(Math.round(h.paxMinAtStakePerDay))} passenger-minutes a day at stake: ${groupedFixed(Math.round(h.paxMinLostPerDay))} by removals, ${groupedFixed(Math.round(h.paxMinAdditionsPerDay))} by additions\n` +
              `wrote ${written.length} files to ${terminalText(outDir)}${path.sep}\n`,
          );
        } finally {
          progress.done();
          db?.close();
        }
        return EXIT.clean;
      },
      { json: Boolean(opts.json) },
    );
  });
}

function checkFormats(list: string[] | undefined): Format[] {
  if (!list || list.length === 0) return [...DEFAULT_FORMATS];
  for (const f of list) {
    if (!(FORMATS as readonly string[]).includes(f)) {
      throw new StopspanError('bad-option', `invalid option --format: expected some of ${FORMATS.join(', ')}`, { value: f });
    }
  }
  return list as Format[];
}

/** A folder name from the feed argument: its base name without extension, made safe. */
export function feedName(feedArg: string): string {
  const base =
    feedArg
      .replace(/[?#].*$/, '')
      .replace(/[/\\]+$/, '')
      .split(/[/\\]/)
      .pop() ?? 'feed';
  const name = base
    .replace(/\.zip$/i, '')
    .replace(/[^A-Za-z0-9._-]+/g, '_')
    .replace(/^[.]+/, '');
  return name || 'feed';
}
