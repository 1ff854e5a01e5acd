// `stopspan compare OLD NEW`: what changed between two versions of a feed, as a terminal summary, JSON,
// or an HTML page and a CSV of changed trips in --out; exit 1 on a service cut beyond --fail-on-trip-loss.
// With --land-use, both audits use the one layer, and the comparison says how many people each version covers.

import { terminalText } from '../common/terminalText.js';
import type { Command } from 'commander';
import { loadParams } from '../model/params.js';
import { StopspanError } from '../common/errors.js';
import { parseLandUseWeights, type LandUseLayer } from '../landuse/readLandUse.js';
import type { ContextStops } from '../network/contextStations.js';
import type { AuditBrief, Comparison } from '../compare/compare.js';
import { compareDocument } from '../report/jsonDocuments.js';
import { EXIT, makeProgress, runAction, numberOption, repeatedOption } from './shared.js';
import { addFeedOptions, feedFetchOptions, type FeedFetchCliOptions } from './feedOptions.js';

/**
 * The exit code of a comparison: 1 when some route lost more than tripLossPct percent of its trips a day
 * (a route that no longer runs lost 100 %), else 0; never 1 without the option.
 */
export function compareExitCode(c: Pick<Comparison, 'trips'>, tripLossPct: number | undefined): number {
  if (tripLossPct === undefined) return EXIT.clean;
  return c.trips.byRoute.some((r) => r.changePct !== null && -r.changePct > tripLossPct) ? EXIT.found : EXIT.clean;
}

interface CompareCliOptions extends FeedFetchCliOptions {
  json?: boolean;
  failOnTripLoss?: string;
  out?: string;
  moveThreshold?: string;
  date?: string;
  ridership?: string;
  params?: string;
  audit: boolean;
  context?: string[];
  landUse?: string;
  landUseWeights?: string;
  force?: boolean;
  quiet?: boolean;
  verbose?: boolean;
}

export function registerCompare(program: Command): void {
  const cmd = program
    .command('compare')
    .description('compare two versions of a feed: stops, patterns, trips and spacing before and after')
    .argument('<old>', 'the older feed: zip, folder or http(s) URL')
    .argument('<new>', 'the newer feed')
    .option('--json', 'print the comparison as JSON on stdout')
    .option('--out <dir>', 'also write compare.html, compare.json and compare-trips.csv into this folder')
    .option('--fail-on-trip-loss <pct>', 'exit 1 when a route loses more than this percentage of its trips a day (a route gone loses 100)')
    .option('--move-threshold <m>', 'a stop that moved more than this many metres counts as moved', '10')
    .option(
      '--date <YYYY-MM-DD>',
      "analysis date for both feeds' patterns (default: each feed's Monday-Friday date with the most trips, frequencies expanded)",
    )
    .option('--ridership <file.csv>', 'stop-level ridership used for both audits (default: assumed demand)')
    .option('--params <file.json>', 'model parameters used for both audits')
    .option(
      '--context <feed>',
      'another feed (zip, folder or URL; repeatable) whose stations within 150 m keep stops as transfer points in both audits; lists the stops that lost or gained such a link',
      repeatedOption,
    )
    .option(
      '--land-use <file>',
      'where people live and work (CSV or GeoJSON, as for audit), read once and used for both audits: people covered by each version and the difference',
    )
    .option(
      '--land-use-weights <list>',
      'the land-use columns read and their weights, as column=weight,... (default population=1,jobs=1, whichever the file has)',
    )
    .option('--force', 'replace the output folder if it holds a previous output of stopspan')
    .option('--no-audit', 'skip the audits: no close stops, wide gaps, passenger-minutes or candidates (faster)')
    .option('-q, --quiet', 'no progress on stderr')
    .option('--verbose', 'stack traces for internal errors')
    .action((oldSource: string, newSource: string, o: CompareCliOptions) =>
      runAction(
        o.verbose === true,
        async () => {
          const moveThresholdM = numberOption('--move-threshold', o.moveThreshold, 0);
          const tripLossPct = numberOption('--fail-on-trip-loss', o.failOnTripLoss, 0);
          const fetch = feedFetchOptions(o);
          if (o.landUseWeights !== undefined && o.landUse === undefined)
            throw new StopspanError('bad-option', 'option --land-use-weights needs --land-use', { value: o.landUseWeights });
          if (o.landUse !== undefined && !o.audit)
            throw new StopspanError('bad-option', 'option --land-use needs the audits: leave out --no-audit', { value: o.landUse });
          const landUseColumns = o.landUseWeights !== undefined ? parseLandUseWeights(o.landUseWeights) : null;
          // the comparison loads when the command runs, not at every start-up of the CLI
          const [
            { auditBrief, compareFeeds, comparedPart, comparedPatterns },
            { runAudit },
            { contextStops },
            { comparisonHtml, comparisonText, comparisonTripsCsv },
            { checkOutFolder, writeFolder },
            { readLandUseAside },
            { loadNetwork },
          ] = await Promise.all([
            import('../compare/compare.js'),
            import('../audit/runAudit.js'),
            import('../network/contextStations.js'),
            import('../report/compareRender.js'),
            import('../report/writeFolder.js'),
            import('../landuse/readLandUseAside.js'),
            import('../network/loadNetwork.js'),
          ]);
          const outOptions = {
            force: o.force === true,
            inputs: [oldSource, newSource, o.ridership, o.params, o.landUse, ...(o.context ?? [])],
          };
          if (o.out) await checkOutFolder(o.out, outOptions); // before the feeds are read
          // the land-use layer is read once, on a worker thread while the older feed is read, and serves both audits
          const landUseRead = o.landUse !== undefined ? readLandUseAside(o.landUse, { columns: landUseColumns }) : undefined;
          landUseRead?.catch(() => undefined); // a failure surfaces at the await below
          let landUse: LandUseLayer | undefined;
          const progress = makeProgress(o.quiet === true || o.json === true);
          // the same parameters and ridership file on both sides, so the figures differ only by the feeds
          const params = o.audit ? loadParams(o.params, {}) : undefined;
          let a, b;
          let oldAudit: AuditBrief | undefined;
          const context = o.context ?? [];
          let oldContext: ContextStops = { near: new Map(), stations: [], feeds: [] };
          let newContext: ContextStops = oldContext;
          try {
            a = await loadNetwork(oldSource, { date: o.date, onProgress: progress.onProgress, dayOnly: true, fetch });
            // context feeds (--context), read for each version on its own date as the audit reads them
            oldContext = await contextStops(a.feed, a.patterns, context, fetch);
            // the older feed is audited, then cut to what the comparison reads, before the newer one is read
            // (only what the comparison reads of the older audit is kept while the newer feed is read and audited)
            landUse = await landUseRead;
            if (params && a.patterns.patterns.length > 0)
              oldAudit = auditBrief(
                runAudit(a.feed, a.patterns, {
                  params,
                  ridership: o.ridership,
                  stations: oldContext.near,
                  contextStations: oldContext.stations,
                  landUse,
                }),
              );
            const oldPatterns = comparedPatterns(a.patterns);
            a = { ...a, feed: comparedPart(a.feed, oldPatterns), patterns: oldPatterns };
            b = await loadNetwork(newSource, { date: o.date, onProgress: progress.onProgress, dayOnly: true, fetch });
            newContext = await contextStops(b.feed, b.patterns, context, fetch);
          } finally {
            progress.done();
          }
          let audits: { old: AuditBrief; new: AuditBrief } | undefined;
          if (params && oldAudit && b.patterns.patterns.length > 0)
            audits = {
              old: oldAudit,
              new: auditBrief(
                runAudit(b.feed, b.patterns, {
                  params,
                  ridership: o.ridership,
                  stations: newContext.near,
                  contextStations: newContext.stations,
                  landUse,
                }),
              ),
            };
          const stationStops = context.length > 0 ? { old: oldContext.near, new: newContext.near } : undefined;
          const c = compareFeeds(a.feed, b.feed, a.patterns, b.patterns, { moveThresholdM, audits, stationStops });
          const code = compareExitCode(c, tripLossPct);
          const doc = compareDocument(c, { old: a.date, new: b.date }, { old: a.analysis, new: b.analysis }, tripLossPct ?? null, code);
          if (o.out) {
            const written = await writeFolder(
              o.out,
              [
                ['compare.html', () => comparisonHtml(c)],
                ['compare.json', JSON.stringify(doc, null, 2) + '\n'],
                ['compare-trips.csv', () => comparisonTripsCsv(c)],
              ],
              outOptions,
            );
            if (!o.quiet) process.stderr.write(`wrote ${terminalText(written.join(', '))}\n`);
          }
          process.stdout.write(o.json ? JSON.stringify(doc, null, 2) + '\n' : comparisonText(c));
          if (!o.json && tripLossPct !== undefined)
            process.stdout.write(
              code === EXIT.found
                ? `FAIL a route lost more than ${tripLossPct} % of its trips a day\n`
                : `no route lost more than ${tripLossPct} % of its trips a day\n`,
            );
          return code;
        },
        { json: o.json === true },
      ),
    );
  addFeedOptions(cmd);
}
