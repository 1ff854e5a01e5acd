// `stopspan whatif FEED`: weigh a concrete proposal (remove, add or move stops) on the feed's patterns and
// print the figures as a table, or as JSON; --out also writes a page of the scenario and scenario.json.
// The scenario is checked whole before the feed is read, so nothing is computed from half of it.

import type { Command } from 'commander';
import { readFeed } from '../gtfs/readFeed.js';
import { buildPatterns } from '../network/buildPatterns.js';
import { evaluateScenario, loadScenarioFile, parseScenario, scenarioFromOptions, type ScenarioInput, type ScenarioResult } from '../audit/whatif.js';
import { StopspanError } from '../common/errors.js';
import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from '../network/types.js';
import { whatifHtml } from '../report/whatifHtml.js';
import { checkUnits } from '../report/units.js';
import { whatifText } from '../report/whatifText.js';
import { writeFolder } from '../report/writeFolder.js';
import { version } from '../version.js';
import { EXIT, listOption, makeProgress, runAction } from './shared.js';
import { addParamOptions, paramOverrides } from './paramOptions.js';
import { mergeParams } from './audit.js';

interface WhatifOpts {
  remove?: string[];
  add?: string[];
  move?: string[];
  scenario?: string;
  date?: string;
  ridership?: string;
  observed?: string;
  params?: string;
  json?: boolean;
  out?: string;
  units?: string;
  force?: boolean;
  quiet?: boolean;
  verbose?: boolean;
  [k: string]: unknown;
}

const collect = (value: string, previous: string[] = []): string[] => previous.concat(value);

/** The scenario from a file and the command-line options together, checked as one. */
export function scenarioOf(opts: { remove?: string[]; add?: string[]; move?: string[]; scenario?: string }): ScenarioInput {
  const fromFile: ScenarioInput = opts.scenario ? loadScenarioFile(opts.scenario) : {};
  const given = Boolean(opts.remove?.length || opts.add?.length || opts.move?.length);
  if (!opts.scenario && !given) {
    throw new StopspanError('bad-option', 'nothing to weigh: give --remove, --add, --move or --scenario');
  }
  const fromOpts: ScenarioInput = given ? scenarioFromOptions({ remove: opts.remove, add: opts.add, move: opts.move }) : {};
  const merged: Record<string, unknown[]> = {};
  for (const k of ['remove', 'add', 'move'] as const) {
    const list = [...(fromFile[k] ?? []), ...(fromOpts[k] ?? [])];
    if (list.length) merged[k] = list;
  }
  return parseScenario(merged, { file: opts.scenario });
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

/** The document --json prints and scenario.json holds. */
export function whatifDocument(feed: Feed, scenario: ScenarioInput, result: ScenarioResult): Record<string, unknown> {
  return {
    tool: { name: 'stopspan', version },
    feed: { source: feed.source, contentHash: feed.contentHash },
    scenario,
    ...result,
  };
}

export function registerWhatif(program: Command): void {
  const cmd = program
    .command('whatif')
    .description('weigh a proposal (remove, add or move stops): walking, riding, run time, gaps, in passenger-minutes per day')
    .argument('<feed>', 'GTFS feed: a .zip file, a folder of .txt files, or an http(s) URL')
    .option('--remove <stops>', 'stops to remove, by stop_id or name (comma-separated; repeatable)', listOption)
    .option('--add <lat,lon[:route]>', 'a stop to add at these coordinates, optionally on one route only (repeatable)', collect)
    .option('--move <stop:lat,lon>', 'a stop to move to these coordinates (repeatable)', collect)
    .option('--scenario <file.json>', 'a scenario file with remove, add and/or move lists (see README)')
    .option('--date <YYYY-MM-DD>', 'analysis date (default: the weekday in the feed with the most trips)')
    .option('--ridership <file.csv>', 'stop-level boardings and alightings per day')
    .option('--observed <archive>', 'GTFS-Realtime archive (zip or folder) for observed dwell, speed and stopping')
    .option('--params <file.json>', 'model parameters (every key optional; see README)')
    .option('--json', 'print the result as one JSON document on stdout')
    .option('--out <dir>', 'also write index.html and scenario.json into this folder')
    .option('--units <system>', 'units people read on the page: metric or imperial', 'metric')
    .option('--force', 'replace the output folder if it exists')
    .option('-q, --quiet', 'no progress on stderr')
    .option('--verbose', 'stack traces for internal errors');
  addParamOptions(cmd);
  cmd.action(async (feedArg: string, opts: WhatifOpts) => {
    await runAction(Boolean(opts.verbose), async () => {
      const scenario = scenarioOf(opts);
      const units = checkUnits(opts.units ?? 'metric');
      if (opts.date !== undefined && !/^\d{4}-\d{2}-\d{2}$/.test(opts.date)) {
        throw new StopspanError('bad-option', 'invalid option --date: expected YYYY-MM-DD', { value: opts.date });
      }
      const params = mergeParams(opts.params, paramOverrides(opts));
      const progress = makeProgress(Boolean(opts.quiet) || Boolean(opts.json));
      let feed: Feed;
      let patterns: PatternSet;
      let result: ScenarioResult;
      try {
        feed = await readFeed(feedArg, { date: opts.date ?? 'auto', onProgress: progress.onProgress });
        patterns = buildPatterns(feed, { date: feed.date ?? undefined, onProgress: progress.onProgress });
        if (patterns.patterns.length === 0) {
          throw new StopspanError('empty-feed', `no route patterns run on ${patterns.date}`, { file: 'trips.txt' });
        }
        const observed = opts.observed ? await (await import('../realtime/calibrate.js')).observeArchive(opts.observed, feed, patterns, { onProgress: progress.onProgress }) : undefined;
        progress.onProgress?.({ stage: 'weighing the scenario' });
        result = evaluateScenario(feed, patterns, scenario, { params, ridership: opts.ridership, observed, onProgress: progress.onProgress });
      } finally {
        progress.done();
      }
      const doc = whatifDocument(feed, scenario, result);
      let written: string[] = [];
      if (opts.out) {
        // loaded here, not at start-up: it pulls in @turf/turf, about 0.27 s of CPU on every CLI run (bench)
        const { whatifStrips } = await import('../report/whatifStrips.js');
        const html = whatifHtml(result, whatifStrips(feed, patterns, scenario, result), { feedSource: feed.source, units });
        written = await writeFolder(opts.out, [['index.html', html], ['scenario.json', JSON.stringify(doc, null, 2) + '\n']], { force: Boolean(opts.force) });
      }
      process.stdout.write(opts.json ? JSON.stringify(doc) + '\n' : whatifText(result, { feedSource: feed.source, labels: labelsOf(feed, patterns, result) }));
      if (written.length && !opts.quiet && !opts.json) process.stderr.write(`wrote ${written.length} files to ${opts.out}\n`);
      return EXIT.clean;
    });
  });
}
