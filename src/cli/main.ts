#!/usr/bin/env node
// The stopspan command line: composes one module per command. Commands only parse options, call the
// library, print and set the exit code.

// first, so that it applies to everything loaded after it
import './engineTuning.js';
import type * as Commander from 'commander';
import { requireCjs } from '../common/requireCjs.js';
import { terminalText } from '../common/terminalText.js';
import { commands } from './commands.js';
import { EXIT } from './shared.js';
import { version } from '../version.js';

const { Command } = requireCjs('commander') as typeof Commander;

// A reader that closes early (`stopspan check ... | head`) is not an error.
process.stdout.on('error', (e: NodeJS.ErrnoException) => {
  if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  throw e;
});

const program = new Command();
program
  .name('stopspan')
  .description('Audit bus stop spacing in a GTFS feed and weigh proposed stop changes.')
  .version(version)
  .showHelpAfterError()
  .exitOverride();
program.configureOutput({ writeErr: (s) => process.stderr.write(s) });

for (const register of commands) register(program);

program.parseAsync(process.argv).catch((e: { code?: string; exitCode?: number }) => {
  // commander's own usage errors (unknown option, missing argument) and --help / --version
  if (e && typeof e.code === 'string' && e.code.startsWith('commander.')) {
    const ok = e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help';
    process.exitCode = ok ? EXIT.clean : EXIT.badInput;
    return;
  }
  process.stderr.write(`internal error (this is a bug): ${terminalText(String((e as Error)?.message ?? e))}\n`);
  process.exitCode = EXIT.internal;
});
