// The work of `stopspan whatif`, loaded when the command runs (src/cli/whatif.ts registers its options):
// the scenario checked whole, the feed read, the proposal weighed, the table, JSON or page written.

import { parseLandUseWeights } from '../landuse/readLandUse.js';
import { readLandUseAside } from '../landuse/readLandUseAside.js';
import { terminalText } from '../common/terminalText.js';
import { isoToGtfsDate } from '../gtfs/calendar.js';
import { loadDayNetwork } from '../network/loadNetwork.js';
import { contextStops } from '../network/contextStations.js';
import {
  evaluateScenario,
  loadScenarioFile,
  parseScenario,
  scenarioFromOptions,
  type ScenarioInput,
  type ScenarioResult,
  type StopFilter,
} from '../whatif/whatif.js';
import { snakeKeys } from '../common/snakeKeys.js';
import { StopspanError } from '../common/errors.js';
import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from '../network/types.js';
import { whatifHtml } from '../report/whatifHtml.js';
import { checkUnits } from '../report/units.js';
import { whatifText } from '../report/whatifText.js';
import { checkOutFolder, writeFolder } from '../report/writeFolder.js';
import { version } from '../version.js';
import { EXIT, makeProgress, runAction } from './shared.js';
import { paramOverrides } from './paramOptions.js';
import { feedFetchOptions, type FeedFetchCliOptions } from './feedOptions.js';
import { loadParams } from '../model/params.js';

/** The options of `stopspan whatif` as commander hands them over (src/cli/whatif.ts declares them). */
export interface WhatifOpts extends FeedFetchCliOptions {
  remove?: string[];
  add?: string[];
  move?: string[];
  scenario?: string;
  route?: string[];
  direction?: string;
  headsign?: string;
  bothDirections?: boolean;
  date?: string;
  ridership?: string;
  landUse?: string;
  landUseWeights?: string;
  observed?: string;
  context?: string[];
  params?: string;
  json?: boolean;
  out?: string;
  units?: string;
  force?: boolean;
  quiet?: boolean;
  verbose?: boolean;
  [k: string]: unknown;
}

/** The scenario from a file and the command-line options together, checked as one. */
export function scenarioOf(
  opts: Pick<WhatifOpts, 'remove' | 'add' | 'move' | 'scenario' | 'route' | 'direction' | 'headsign' | 'bothDirections'>,
): ScenarioInput {
  const fromFile: ScenarioInput = opts.scenario ? loadScenarioFile(opts.scenario) : {};
  const given = Boolean(opts.remove?.length || opts.add?.length || opts.move?.length);
  if (!opts.scenario && !given) {
    throw new StopspanError('bad-option', 'nothing to weigh: give --remove, --add, --move or --scenario');
  }
  const filter: StopFilter = {
    ...(opts.route?.length ? { routes: opts.route } : {}),
    ...(opts.direction !== undefined ? { direction: directionOption(opts.direction) } : {}),
    ...(opts.headsign !== undefined ? { headsign: opts.headsign } : {}),
    ...(opts.bothDirections ? { both_directions: true } : {}),
  };
  if (Object.keys(filter).length && !opts.remove?.length && !opts.move?.length) {
    throw new StopspanError(
      'bad-option',
      '--route, --direction, --headsign and --both-directions choose the stops of --remove or --move; give one of those',
    );
  }
  const fromOpts: ScenarioInput = given ? scenarioFromOptions({ remove: opts.remove, add: opts.add, move: opts.move, filter }) : {};
  const merged: Record<string, unknown[]> = {};
  for (const k of ['remove', 'add', 'move'] as const) {
    const list = [...(fromFile[k] ?? []), ...(fromOpts[k] ?? [])];
    if (list.length) merged[k] = list;
  }
  return parseScenario(merged, { file: opts.scenario });
}

function directionOption(v: string): number {
  if (v.trim() !== '0' && v.trim() !== '1')
    throw new StopspanError('bad-option', 'invalid option --direction: expected direction_id 0 or 1', { value: v });
  return Number(v.trim());
}

/** Column headings per pattern: route short name and headsign. */
function labelsOf(feed: Feed, patterns: PatternSet, result: ScenarioResult): Map<string, string> {
  const byId = new Map(patterns.patterns.map((p) => [p.id, p]));
  const out = new Map<string, string>();
  for (const e of result.patterns) {
    const p = byId.get(e.patternId);
    const route = feed.routes.get(e.routeId);
    const name = route?.shortName || e.routeId;
    out.set(e.patternId, `route ${name}${p?.headsign ? ` to ${p.headsign}` : ''}`);
  }
  return out;
}

/** The document --json prints and result.json holds, keys in snake_case as summary.json. */
export function whatifDocument(feed: Feed, scenario: ScenarioInput, result: ScenarioResult): Record<string, unknown> {
  return snakeKeys({
    tool: { name: 'stopspan', version },
    feed: { source: feed.source, contentHash: feed.contentHash },
    scenario,
    ...result,
  }) as Record<string, unknown>;
}

/** Runs the command: the action registered by registerWhatif. */
export async function runWhatif(feedArg: string, opts: WhatifOpts): Promise<void> {
  await runAction(
    Boolean(opts.verbose),
    async () => {
      const fetch = feedFetchOptions(opts);
      const scenario = scenarioOf(opts);
      const units = checkUnits(opts.units ?? 'metric');
      if (opts.date !== undefined) isoToGtfsDate(opts.date, '--date');
      const params = loadParams(opts.params, paramOverrides(opts));
      const outOptions = {
        force: Boolean(opts.force),
        inputs: [feedArg, opts.scenario, opts.ridership, opts.landUse, opts.observed, opts.params, ...(opts.context ?? [])],
      };
      if (opts.landUseWeights !== undefined && opts.landUse === undefined)
        throw new StopspanError('bad-option', 'option --land-use-weights needs --land-use', { value: opts.landUseWeights });
      const landUseColumns = opts.landUseWeights !== undefined ? parseLandUseWeights(opts.landUseWeights) : null;
      if (opts.out) await checkOutFolder(opts.out, outOptions); // before the feed is read
      const progress = makeProgress(Boolean(opts.quiet) || Boolean(opts.json));
      let feed: Feed;
      let patterns: PatternSet;
      let result: ScenarioResult;
      try {
        // the land-use layer is read on a worker thread while the feed is read (readLandUseAside.ts)
        const landUseRead = opts.landUse !== undefined ? readLandUseAside(opts.landUse, { columns: landUseColumns }) : undefined;
        landUseRead?.catch(() => undefined); // a failure surfaces at the await below
        ({ feed, patterns } = await loadDayNetwork(feedArg, { date: opts.date, onProgress: progress.onProgress, fetch }));
        // context feeds (--context): read and matched to the stops as the audit does, so a change beside a station says so
        const stations = (await contextStops(feed, patterns, opts.context ?? [], fetch)).near;
        const observed = opts.observed
          ? await (
              await import('../realtime/calibrate.js')
            ).observeArchive(opts.observed, feed, patterns, { onProgress: progress.onProgress })
          : undefined;
        const landUse = await landUseRead;
        progress.onProgress?.({ stage: 'weighing the scenario' });
        result = evaluateScenario(feed, patterns, scenario, {
          params,
          ridership: opts.ridership,
          observed,
          stations,
          landUse,
          onProgress: progress.onProgress,
        });
      } finally {
        progress.done();
      }
      const doc = whatifDocument(feed, scenario, result);
      let written: string[] = [];
      if (opts.out) {
        // loaded here, not at start-up: it pulls in @turf/turf, about 0.27 s of CPU on every CLI run (bench)
        const { whatifStrips } = await import('../report/whatifStrips.js');
        const html = whatifHtml(result, whatifStrips(feed, patterns, scenario, result), { feedSource: feed.source, units });
        written = await writeFolder(
          opts.out,
          [
            ['index.html', html],
            ['result.json', JSON.stringify(doc, null, 2) + '\n'],
            ['scenario.json', JSON.stringify(scenario, null, 2) + '\n'],
          ],
          outOptions,
        );
      }
      process.stdout.write(
        opts.json
          ? JSON.stringify(doc) + '\n'
          : whatifText(result, {
              feedSource: feed.source,
              labels: labelsOf(feed, patterns, result),
              routeNames: new Map([...feed.routes].map(([id, r]) => [id, r.shortName || id])),
              units,
            }),
      );
      if (written.length && !opts.quiet && !opts.json)
        process.stderr.write(`wrote ${written.length} files to ${terminalText(String(opts.out))}\n`);
      return EXIT.clean;
    },
    { json: Boolean(opts.json) },
  );
}
