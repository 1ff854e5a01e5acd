// `stopspan check FEED`: feed-quality findings for nightly jobs, as text or JSON, with an exit code
// chosen by --fail-on, and optionally one row in a history database.

import type { Command } from 'commander';
import type { CheckReport } from '../check/check.js';
import { FINDINGS, FINDING_CODES, SEVERITY_RANK, type Severity, type SpeedFamily, type ThresholdOptions } from '../check/findings.js';
import { StopspanError } from '../common/errors.js';
import { NEXT_SERVICE_WINDOW_DAYS } from '../gtfs/calendar.js';
import { checkDocument } from '../report/jsonDocuments.js';
import { EXIT, listOption, makeProgress, runAction, numberOption, repeatedOption } from './shared.js';
import { addFeedOptions, feedFetchOptions, type FeedFetchCliOptions } from './feedOptions.js';

export type FailOn = Severity | 'never';
const FAIL_ON: FailOn[] = ['error', 'warning', 'info', 'never'];

/** The exit code of a check: 1 when a finding at or above failOn exists, else 0. */
export function checkExitCode(report: Pick<CheckReport, 'findings'>, failOn: FailOn): number {
  if (failOn === 'never') return EXIT.clean;
  return report.findings.some((f) => f.count > 0 && SEVERITY_RANK[f.severity] >= SEVERITY_RANK[failOn]) ? EXIT.found : EXIT.clean;
}

interface CheckCliOptions extends FeedFetchCliOptions {
  json?: boolean;
  failOn: string;
  date?: string;
  today?: string;
  history?: string;
  maxExamples: string;
  twinStopM?: string;
  offPathM?: string;
  outlierKm?: string;
  serviceMinDays?: string;
  speed: string[];
  context?: string[];
  quiet?: boolean;
  verbose?: boolean;
}

/** Turns the command-line threshold flags into threshold options (validated again by the library). */
export function thresholdsFromCli(
  o: Pick<CheckCliOptions, 'twinStopM' | 'offPathM' | 'outlierKm' | 'serviceMinDays' | 'speed'>,
): ThresholdOptions {
  const t: ThresholdOptions = {
    twinStopM: numberOption('--twin-stop-m', o.twinStopM),
    offPathM: numberOption('--off-path-m', o.offPathM),
    outlierMinKm: numberOption('--outlier-km', o.outlierKm),
    serviceMinDays: numberOption('--service-min-days', o.serviceMinDays),
  };
  for (const spec of o.speed ?? []) {
    const m = /^([a-z]+)=(\d+(?:\.\d+)?):(\d+(?:\.\d+)?)$/.exec(spec);
    if (!m)
      throw new StopspanError('bad-option', `invalid option --speed: expected FAMILY=MIN:MAX in km/h (e.g. bus=3:100), got ${spec}`, {
        value: spec,
      });
    t.speedKmh = { ...t.speedKmh, [m[1] as SpeedFamily]: { minKmh: Number(m[2]), maxKmh: Number(m[3]) } };
  }
  for (const k of Object.keys(t) as (keyof ThresholdOptions)[]) if (t[k] === undefined) delete t[k];
  return t;
}

export function registerCheck(program: Command): void {
  const codes = FINDING_CODES.map((c) => `  ${c.padEnd(20)} ${FINDINGS[c].severity.padEnd(8)} ${FINDINGS[c].explanation}`).join('\n');
  const cmd = program
    .command('check')
    .description('check a feed for nightly jobs: list its findings, exit 1 when one is at or above --fail-on')
    .argument('<feed>', 'GTFS feed: zip, folder or http(s) URL')
    .option('--json', 'print the report as JSON on stdout')
    .option('--fail-on <severity>', 'exit 1 when a finding at or above this severity exists: error, warning, info or never', 'error')
    .option(
      '--date <YYYY-MM-DD>',
      'analysis date for the pattern checks (default: the run date, or the first day with service in the week after it); nothing running that day exits 2',
    )
    .option('--today <YYYY-MM-DD>', 'the run date: its service is checked and service-ending-soon counts from it (default: today, UTC)')
    .option('--history <file.sqlite>', 'record this run in a history database (created on first use)')
    .option('--max-examples <n>', 'examples kept per finding', '5')
    .option('--twin-stop-m <m>', 'consecutive stops closer than this are twins (default 5)')
    .option('--off-path-m <m>', 'a stop farther than this from its shape is off the path (default 100)')
    .option('--outlier-km <km>', 'stops farther than this (at least) from the median stop are outliers (default 100)')
    .option('--service-min-days <days>', 'service must run at least this many days after --today (default 7)')
    .option(
      '--speed <family=min:max>',
      'scheduled speed bounds in km/h per family (bus, tram, metro, rail, ferry, cable, other); repeatable',
      listOption,
      [],
    )
    .option(
      '--context <feed>',
      'another feed (zip, folder or URL; repeatable): an unreadable one exits 2; reports its stations and service on the date, and the stops served within 150 m of one',
      repeatedOption,
    )
    .option('-q, --quiet', 'no progress on stderr')
    .option('--verbose', 'stack traces for internal errors')
    .addHelpText(
      'after',
      `\nFindings (code, default severity, meaning):\n${codes}\n\nThe pattern checks run on --date, else on the run date (--today), else on the first day with service in the ${NEXT_SERVICE_WINDOW_DAYS} days after it; none at all is the no-service finding.\n\nExit codes: 0 clean, 1 a finding at or above --fail-on, 2 unreadable input or bad usage (with --json, an error document on stdout too), 3 internal error.`,
    )
    .action((source: string, o: CheckCliOptions) =>
      runAction(
        o.verbose === true,
        async () => {
          if (!FAIL_ON.includes(o.failOn as FailOn)) {
            throw new StopspanError('bad-option', `invalid option --fail-on: expected one of ${FAIL_ON.join(', ')}, got ${o.failOn}`, {
              value: o.failOn,
            });
          }
          const maxExamples = numberOption('--max-examples', o.maxExamples, 0)!;
          const thresholds = thresholdsFromCli(o);
          const fetch = feedFetchOptions(o);
          // the checks load when the command runs, not at every start-up of the CLI
          const [{ checkFeed, TripFindings }, { checkText }, { loadNetwork }] = await Promise.all([
            import('../check/check.js'),
            import('../report/checkText.js'),
            import('../network/loadNetwork.js'),
          ]);
          const today = o.today ?? new Date().toISOString().slice(0, 10);
          // the history is opened (and checked to be this tool's) before the feed is read: a bad one fails at once
          const history = o.history ? await import('../history/index.js') : undefined; // only when asked for
          const db = history && o.history ? history.openHistory(o.history) : undefined;
          let report;
          let loaded;
          // the per-trip findings are gathered as stop_times is read, so only the analysis date's trips are held
          const tripFindings = new TripFindings(Math.floor(maxExamples));
          try {
            const progress = makeProgress(o.quiet === true || o.json === true);
            try {
              loaded = await loadNetwork(source, { date: o.date, today, onProgress: progress.onProgress, fetch, tripRows: tripFindings });
            } finally {
              progress.done();
            }
            // context feeds (--context), read on the analysis date as the audit reads them
            let context;
            if (o.context?.length) {
              const { contextStops } = await import('../network/contextStations.js');
              const { near, feeds } = await contextStops(loaded.feed, loaded.patterns, o.context, fetch);
              context = { near, feeds };
            }
            report = checkFeed(loaded.feed, loaded.patterns, {
              today,
              thresholds,
              maxExamples: Math.floor(maxExamples),
              analysis: loaded.analysis,
              context,
              tripFindings,
            });
            if (history && db) history.recordRun(db, history.checkRunRow(report));
          } finally {
            db?.close();
          }
          const code = checkExitCode(report, o.failOn as FailOn);
          if (o.json) {
            process.stdout.write(JSON.stringify(checkDocument(report, loaded.date, o.failOn, code), null, 2) + '\n');
          } else {
            process.stdout.write(checkText(report));
          }
          return code;
        },
        { json: o.json === true },
      ),
    );
  addFeedOptions(cmd);
}
