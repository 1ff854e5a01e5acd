// Tunes V8 for a command that runs once and exits. V8 optimises a function once it has run about 66 KB of
// bytecode (its interrupt budget); in a one-shot audit most functions run briefly, and compiling them
// spent about 1.4 s of CPU on Manhattan's bus feed on threads that took the CPU from the main thread
// (which waited 0.3-0.4 s to run, on two cores). With about three times the budget (200 000 at first)
// the hot loops are still optimised, a little later, and much less is compiled: Manhattan's audit 2.16 ->
// 1.88 s wall and 3.2 -> 2.7 s CPU, the subway's 2.29 -> 2.07 s (medians of 6-12 alternating runs, 2
// cores; see README, Speed).
// 300 000 rather than 200 000 since the command is one bundle and reads faster: Manhattan's wall -2 %, -5 %
// and -9 % in three rounds of 8-10 alternating runs, the subway +1 % and +4 %, LIRR -5 %, the demo -2 %.
// After each full collection V8 lets the heap grow to up to four times what survived before it collects
// again: a long audit of a big network (live heap 100-140 MB) then peaked with 300 MB of garbage held.
// Growing by a quarter instead keeps the peak near what is live: the merged city network's audit
// 617 -> 367 MiB, Manhattan's 189 -> 171 MB; the cost is more collections, about a tenth more CPU and
// 6 % more wall time on the merged network (medians of three alternating runs).
// Only the command line sets these: the library leaves its host's engine alone. A flag given to node
// (or in NODE_OPTIONS) is left as it is.

import { setFlagsFromString } from 'node:v8';

/** Bytes of bytecode a function runs before V8 considers optimising it (V8's default is 67 584). */
export const CLI_INTERRUPT_BUDGET = 300_000;

/** How much the heap may grow past what survived a full collection, in per cent (V8's default: up to 300). */
export const CLI_HEAP_GROWING_PERCENT = 25;

/** Whether node was started with its own V8 flag `name` (dashes, on its command line or in NODE_OPTIONS). */
export function engineFlagGiven(name: string, execArgv: readonly string[], nodeOptions: string | undefined): boolean {
  const flag = new RegExp(`^--${name.replace(/-/g, '[-_]')}(=|$)`);
  return [...execArgv, ...(nodeOptions ?? '').split(/\s+/)].some((a) => flag.test(a));
}

/** Whether node was started with its own --interrupt-budget (on its command line or in NODE_OPTIONS). */
export function interruptBudgetGiven(execArgv: readonly string[], nodeOptions: string | undefined): boolean {
  return engineFlagGiven('interrupt-budget', execArgv, nodeOptions);
}

if (!interruptBudgetGiven(process.execArgv, process.env.NODE_OPTIONS)) setFlagsFromString(`--interrupt-budget=${CLI_INTERRUPT_BUDGET}`);
if (!engineFlagGiven('heap-growing-percent', process.execArgv, process.env.NODE_OPTIONS))
  setFlagsFromString(`--heap-growing-percent=${CLI_HEAP_GROWING_PERCENT}`);
