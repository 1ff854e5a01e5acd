// The JSON documents the check, compare and history commands print (and compare writes as compare.json),
// and the error document of a failed --json run: snake_case keys, a schema_version and the tool in each,
// each described by a JSON Schema in schema/ (check, compare, history, error .schema.json).

import type { CheckReport } from '../check/check.js';
import type { Comparison } from '../compare/compare.js';
import type { AnalysisDay } from '../gtfs/calendar.js';
import type { RunRecord } from '../history/readHistory.js';
import { version } from '../version.js';
import { snakeKeys } from '../common/snakeKeys.js';

/** Version of the check, compare, history and error documents' layout; raised on a breaking change. */
export const JSON_DOCUMENT_VERSION = 1;

const head = () => ({ schema_version: JSON_DOCUMENT_VERSION, tool: { name: 'stopspan', version } });

/** `check --json`: the report, the analysis date, the --fail-on severity and the exit code. */
export function checkDocument(report: CheckReport, analysisDate: string | null, failOn: string, exitCode: number): Record<string, unknown> {
  return { ...head(), ...(snakeKeys({ analysisDate, ...report, failOn, exitCode }) as Record<string, unknown>) };
}

/** `compare --json` and compare.json: both feeds' dates and analysis days, the comparison, the threshold and exit code. */
export function compareDocument(
  c: Comparison,
  dates: { old: string | null; new: string | null },
  analysis: { old: AnalysisDay; new: AnalysisDay },
  failOnTripLossPct: number | null,
  exitCode: number,
): Record<string, unknown> {
  return { ...head(), ...(snakeKeys({ dates, analysis, ...c, failOnTripLossPct, exitCode }) as Record<string, unknown>) };
}

/** `history --json`: the runs read, oldest first. */
export function historyDocument(runs: RunRecord[]): Record<string, unknown> {
  return { ...head(), runs: snakeKeys(runs) };
}

/** The document a failed --json run prints: the error's code, message and where, and the exit code. */
export function errorJsonDocument(error: Record<string, string | number | string[]>, exitCode: number): Record<string, unknown> {
  return { ...head(), error: snakeKeys(error), exit_code: exitCode };
}
