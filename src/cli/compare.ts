// `stopspan compare OLD NEW`: what changed between two versions of a feed, as a terminal summary, JSON,
// or an HTML page in --out.

import { terminalText } from '../common/terminalText.js';
import type { Command } from 'commander';
import { mergeParams } from './audit.js';
import type { AuditResult } from '../audit/types.js';
import { version } from '../version.js';
import { EXIT, makeProgress, runAction } from './shared.js';
import { loadFeed, numberOption, writeFiles } from './feedInput.js';

interface CompareCliOptions {
  json?: boolean;
  out?: string;
  moveThreshold?: string;
  date?: string;
  ridership?: string;
  params?: string;
  audit: boolean;
  quiet?: boolean;
  verbose?: boolean;
}

export function registerCompare(program: Command): void {
  program
    .command('compare')
    .description('What changed between two versions of a feed: stops, patterns and spacing before and after.')
    .argument('<old>', 'the older feed: zip, folder or http(s) URL')
    .argument('<new>', 'the newer feed')
    .option('--json', 'print the comparison as JSON on stdout')
    .option('--out <dir>', 'also write compare.html and compare.json into this folder')
    .option('--move-threshold <m>', 'a stop that moved more than this many metres counts as moved', '10')
    .option('--date <YYYY-MM-DD>', "analysis date for both feeds' patterns (default: each feed's busiest weekday)")
    .option('--ridership <file.csv>', 'stop-level ridership used for both audits (default: assumed demand)')
    .option('--params <file.json>', 'model parameters used for both audits')
    .option('--no-audit', 'skip the audits: no close stops, wide gaps, passenger-minutes or candidates (faster)')
    .option('-q, --quiet', 'no progress on stderr')
    .option('--verbose', 'stack traces for internal errors')
    .action((oldSource: string, newSource: string, o: CompareCliOptions) =>
      runAction(o.verbose === true, async () => {
        const moveThresholdM = numberOption('--move-threshold', o.moveThreshold, 0);
        // the comparison loads when the command runs, not at every start-up of the CLI
        const [{ compareFeeds }, { runAudit }, { comparisonHtml, comparisonText }] = await Promise.all([import('../audit/compare.js'), import('../audit/runAudit.js'), import('../audit/compareRender.js')]);
        const progress = makeProgress(o.quiet === true || o.json === true);
        let a, b;
        try {
          a = await loadFeed(oldSource, { date: o.date, onProgress: progress.onProgress });
          b = await loadFeed(newSource, { date: o.date, onProgress: progress.onProgress });
        } finally {
          progress.done();
        }
        let audits: { old: AuditResult; new: AuditResult } | undefined;
        if (o.audit && a.patterns.patterns.length > 0 && b.patterns.patterns.length > 0) {
          // the same parameters and ridership file on both sides, so the figures differ only by the feeds
          const params = mergeParams(o.params, {});
          audits = { old: runAudit(a.feed, a.patterns, { params, ridership: o.ridership }), new: runAudit(b.feed, b.patterns, { params, ridership: o.ridership }) };
        }
        const c = compareFeeds(a.feed, b.feed, a.patterns, b.patterns, { moveThresholdM, audits });
        const doc = { tool: { name: 'stopspan', version }, dates: { old: a.date, new: b.date }, ...c };
        if (o.out) {
          const written = await writeFiles(o.out, { 'compare.html': comparisonHtml(c), 'compare.json': JSON.stringify(doc, null, 2) + '\n' });
          if (!o.quiet) process.stderr.write(`wrote ${terminalText(written.join(', '))}\n`);
        }
        process.stdout.write(o.json ? JSON.stringify(doc, null, 2) + '\n' : comparisonText(c));
        return EXIT.clean;
      }),
    );
}
