// What every command shares: the exit-code contract, the one error handler at the boundary, and the
// progress drawer (stderr, only when a person is watching).

import { parseDecimal } from '../common/decimal.js';
import { StopspanError, isStopspanError } from '../common/errors.js';
import { errorJsonDocument } from '../report/jsonDocuments.js';
import { terminalText } from '../common/terminalText.js';
import { groupedFixed } from '../report/numberText.js';
import type { OnProgress, ProgressEvent } from '../common/progress.js';

export const EXIT = { clean: 0, found: 1, badInput: 2, internal: 3 } as const;

/**
 * Whether an exception is the engine refusing an allocation (a string, array or buffer past what it can
 * hold): input beyond every cap the reader checks, so it is reported as too large, not as a bug.
 */
export function isAllocationFailure(e: unknown): boolean {
  return e instanceof RangeError && /^(Invalid (string|array|typed array) length|Array buffer allocation failed)/.test(e.message);
}

/**
 * Runs a command action; known failures become one line on stderr and exit 2, anything else exit 3. With
 * json, a failure also prints errorDocument on stdout, so a redirect always captures the outcome.
 */
export async function runAction(verbose: boolean, action: () => Promise<number>, options: { json?: boolean } = {}): Promise<void> {
  let code: number;
  try {
    code = await action();
  } catch (e) {
    if (isStopspanError(e)) {
      process.stderr.write(`error: ${e.oneLine()}\n`);
      for (const c of e.context.choices ?? []) process.stderr.write(`  ${terminalText(c)}\n`);
      code = EXIT.badInput;
    } else if (isAllocationFailure(e)) {
      process.stderr.write(`error: the input is too large to hold in memory (feed-too-large: ${(e as Error).message})\n`);
      code = EXIT.badInput;
    } else {
      const err = e as Error;
      process.stderr.write(`internal error (this is a bug): ${terminalText(String(err?.message ?? e))}\n`);
      if (verbose && err?.stack) process.stderr.write(err.stack + '\n');
      code = EXIT.internal;
    }
    if (options.json) process.stdout.write(JSON.stringify(errorDocument(e, code), null, 2) + '\n');
  }
  process.exitCode = code;
}

/** The JSON document of a failed run: the error's code, message and where (file, line, column, value), and the exit code. */
export function errorDocument(e: unknown, exitCode: number): Record<string, unknown> {
  const error: Record<string, string | number | string[]> = isStopspanError(e)
    ? { code: e.code, message: e.message, ...Object.fromEntries(Object.entries(e.context).filter(([, v]) => v !== undefined)) }
    : { code: isAllocationFailure(e) ? 'feed-too-large' : 'internal', message: String((e as Error)?.message ?? e) };
  return errorJsonDocument(error, exitCode);
}

/** Where progress is drawn: stderr, or a stand-in in tests. */
export interface ProgressStream {
  isTTY?: boolean;
  columns?: number;
  write(text: string): unknown;
}

/**
 * Whether a terminal takes cursor and erase codes: not one that says it cannot (TERM=dumb), and not
 * when the user asks for plain output (NO_COLOR set and not empty, common practice for command-line tools).
 */
export function terminalTakesEscapes(env: Readonly<Record<string, string | undefined>>): boolean {
  return env.TERM !== 'dumb' && !env.NO_COLOR;
}

/**
 * A progress callback for a person watching stderr: one line redrawn in place on a terminal that takes
 * escape codes, a plain line per stage on one that does not (TERM=dumb, NO_COLOR), nothing when stderr is
 * not a terminal (a log file or a pipe) or when quiet.
 */
export function makeProgress(
  quiet: boolean,
  stream: ProgressStream = process.stderr,
  env: Readonly<Record<string, string | undefined>> = process.env,
): { onProgress: OnProgress | undefined; done: () => void } {
  if (quiet || stream.isTTY !== true) return { onProgress: undefined, done: () => {} };
  const redraw = terminalTakesEscapes(env);
  let last = 0;
  let lastStage = '';
  const draw = (ev: ProgressEvent) => {
    const now = Date.now();
    if (!redraw) {
      if (ev.stage !== lastStage) stream.write(`${terminalText(ev.stage)}\n`); // one line a stage, no figures rewritten
      lastStage = ev.stage;
      return;
    }
    if (ev.stage === lastStage && now - last < 100) return;
    last = now;
    lastStage = ev.stage;
    let text = ev.stage;
    if (ev.done !== undefined) {
      const d = ev.unit === 'bytes' ? `${(ev.done / 1e6).toFixed(1)} MB` : groupedFixed(ev.done);
      const t = ev.total ? (ev.unit === 'bytes' ? ` / ${(ev.total / 1e6).toFixed(1)} MB` : ` / ${groupedFixed(ev.total)}`) : '';
      text += `: ${d}${t}${ev.unit && ev.unit !== 'bytes' ? ' ' + ev.unit : ''}`;
    }
    stream.write(`\r\x1b[2K${text.slice(0, Math.max(20, (stream.columns || 80) - 1))}`);
  };
  return { onProgress: draw, done: () => (redraw ? stream.write('\r\x1b[2K') : undefined) };
}

/** Parses a comma-separated list option. */
export function listOption(value: string, previous: string[] = []): string[] {
  return previous.concat(
    value
      .split(',')
      .map((s) => s.trim())
      .filter(Boolean),
  );
}

/** Collects a repeatable option's values in the order given. */
export function repeatedOption(value: string, previous: string[] = []): string[] {
  return previous.concat(value);
}

/** Parses a numeric option value, or throws bad-option naming the option. */
export function numberOption(name: string, raw: string | undefined, min = 0): number | undefined {
  if (raw === undefined) return undefined;
  const v = parseDecimal(raw);
  if (v === null || v < min) {
    throw new StopspanError('bad-option', `invalid option ${name}: expected a number >= ${min}, got ${raw}`, { value: raw });
  }
  return v;
}
