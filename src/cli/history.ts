// `stopspan history FILE.sqlite`: the trend of recorded runs, as a table, JSON, or an HTML page with
// inline SVG charts in --out.

import { terminalText } from '../common/terminalText.js';
import { existsSync } from 'node:fs';
import type { Command } from 'commander';
import { StopspanError } from '../common/errors.js';
import { EXIT, runAction } from './shared.js';
import { numberOption, writeFiles } from './feedInput.js';

interface HistoryCliOptions {
  json?: boolean;
  out?: string;
  command?: string;
  limit?: string;
  quiet?: boolean;
  verbose?: boolean;
}

export function registerHistory(program: Command): void {
  program
    .command('history')
    .description('The trend of runs recorded with --history: a table, JSON, or an HTML page with --out.')
    .argument('<file>', 'the history database (SQLite)')
    .option('--json', 'print the runs as JSON on stdout')
    .option('--out <dir>', 'also write history.html into this folder')
    .option('--command <name>', 'only runs of this command (check, audit)')
    .option('--limit <n>', 'only the newest n runs')
    .option('-q, --quiet', 'say nothing on stderr')
    .option('--verbose', 'stack traces for internal errors')
    .action((file: string, o: HistoryCliOptions) =>
      runAction(o.verbose === true, async () => {
        const limit = numberOption('--limit', o.limit, 1);
        if (!existsSync(file)) throw new StopspanError('history-db', 'no such history database', { file });
        const { historyHtml, historyText, openHistory, readHistory } = await import('../history/index.js'); // the SQLite binding loads only for this command
        const db = openHistory(file);
        let rows;
        try {
          rows = readHistory(db, { command: o.command, limit: limit === undefined ? undefined : Math.floor(limit) });
        } finally {
          db.close();
        }
        if (o.out) {
          const written = await writeFiles(o.out, { 'history.html': historyHtml(rows) });
          if (!o.quiet) process.stderr.write(`wrote ${terminalText(written.join(', '))}\n`);
        }
        process.stdout.write(o.json ? JSON.stringify(rows, null, 2) + '\n' : historyText(rows));
        return EXIT.clean;
      }),
    );
}
