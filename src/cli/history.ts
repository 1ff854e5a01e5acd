// `stopspan history FILE.sqlite`: the trend of recorded runs, as a table, JSON, or an HTML page with
// inline SVG charts in --out.

import { terminalText } from '../common/terminalText.js';
import { existsSync } from 'node:fs';
import type { Command } from 'commander';
import { StopspanError } from '../common/errors.js';
import { EXIT, numberOption, runAction } from './shared.js';
import { historyDocument } from '../report/jsonDocuments.js';

interface HistoryCliOptions {
  json?: boolean;
  out?: string;
  command?: string;
  feed?: string;
  limit?: string;
  force?: boolean;
  quiet?: boolean;
  verbose?: boolean;
}

export function registerHistory(program: Command): void {
  program
    .command('history')
    .description('show the trend of runs recorded with --history, one line per feed: a table, JSON, or an HTML page with --out')
    .argument('<file>', 'the history database (SQLite)')
    .option('--json', 'print the runs as JSON on stdout')
    .option('--out <dir>', 'also write history.html into this folder')
    .option('--command <name>', 'only runs of this command (check, audit)')
    .option('--feed <name>', 'only runs of this feed: its publisher (feed_info.txt), or its source when it names none')
    .option('--limit <n>', 'only the newest n runs')
    .option('--force', 'replace the output folder if it holds a previous output of stopspan')
    .option('-q, --quiet', 'say nothing on stderr')
    .option('--verbose', 'stack traces for internal errors')
    .action((file: string, o: HistoryCliOptions) =>
      runAction(
        o.verbose === true,
        async () => {
          const limit = numberOption('--limit', o.limit, 1);
          if (!existsSync(file)) throw new StopspanError('history-db', 'no such history database', { file });
          const { checkOutFolder, writeFolder } = await import('../report/writeFolder.js');
          const outOptions = { force: o.force === true, inputs: [file] };
          if (o.out) await checkOutFolder(o.out, outOptions); // before the database is read
          const { openHistory, readHistory } = await import('../history/index.js'); // the SQLite binding loads only for this command
          const [{ historyHtml }, { historyText }] = await Promise.all([
            import('../report/historyHtml.js'),
            import('../report/historyText.js'),
          ]);
          const db = openHistory(file, { readOnly: true }); // reading changes nothing in the file
          let rows;
          try {
            rows = readHistory(db, { command: o.command, feed: o.feed, limit: limit === undefined ? undefined : Math.floor(limit) });
          } finally {
            db.close();
          }
          if (o.out) {
            const written = await writeFolder(o.out, [['history.html', () => historyHtml(rows)]], outOptions);
            if (!o.quiet) process.stderr.write(`wrote ${terminalText(written.join(', '))}\n`);
          }
          process.stdout.write(o.json ? JSON.stringify(historyDocument(rows), null, 2) + '\n' : historyText(rows));
          return EXIT.clean;
        },
        { json: o.json === true },
      ),
    );
}
