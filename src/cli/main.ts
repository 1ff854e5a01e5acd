#!/usr/bin/env node
// The stopspan command line: composes one module per command. Commands only parse options, call the
// library, print and set the exit code.

// first, so that it applies to everything loaded after it
import './engineTuning.js';
import type * as Commander from 'commander';
import { requireCjs } from '../common/requireCjs.js';
import { runInterruptUndo, watchInterruptUndo } from '../common/interrupts.js';
import { terminalText } from '../common/terminalText.js';
import { commands } from './commands.js';
import { EXIT, isAllocationFailure } from './shared.js';
import { version } from '../version.js';

const { Command } = requireCjs('commander') as typeof Commander;

// A reader that closes early (`stopspan check ... | head`) is not an error.
process.stdout.on('error', (e: NodeJS.ErrnoException) => {
  if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  throw e;
});

// Ctrl-C (SIGINT) or a kill (SIGTERM) while this run has a temporary folder or a download on disk: undo
// what it started and exit 128 + the signal's number, as a shell reports a killed command. The handlers are
// installed only while there is something to undo, so at every other moment (a long computation included)
// the signal ends the run at once, as Node does by default.
const SIGNAL_EXIT = { SIGINT: 130, SIGTERM: 143 } as const;
function onSignal(signal: keyof typeof SIGNAL_EXIT): void {
  runInterruptUndo();
  process.stderr.write(`\ninterrupted (${signal}): removed this run's temporary files\n`);
  process.exit(SIGNAL_EXIT[signal]);
}
let handling = false;
watchInterruptUndo((count) => {
  if (count > 0 === handling) return;
  handling = count > 0;
  for (const signal of Object.keys(SIGNAL_EXIT) as (keyof typeof SIGNAL_EXIT)[]) {
    if (handling) process.on(signal, onSignal);
    else process.off(signal, onSignal);
  }
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
  if (isAllocationFailure(e)) {
    process.stderr.write(`error: the input is too large to hold in memory (feed-too-large: ${(e as Error).message})\n`);
    process.exitCode = EXIT.badInput;
    return;
  }
  process.stderr.write(`internal error (this is a bug): ${terminalText(String((e as Error)?.message ?? e))}\n`);
  process.exitCode = EXIT.internal;
});
