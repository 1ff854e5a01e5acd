// Recoverable oddities found while reading or analysing: counted, a few examples kept, never fatal. The
// codes, their titles and explanations are the closed table in warningCodes.ts.

import { WARNINGS, type WarningCode } from './warningCodes.js';

export interface FeedWarning {
  code: string; // short kebab-case name, e.g. 'padded-values', 'trip-without-shape'
  message: string; // one line for people
  count: number;
  examples: string[]; // at most a few "file:line column" or id strings
}

/** Collects warnings by code, counting every occurrence and keeping the first few examples. */
export class WarningSink {
  private byCode = new Map<string, FeedWarning>();
  constructor(private readonly maxExamples = 5) {}
  /**
   * Counts `n` occurrences of a warning of the table (src/common/warningCodes.ts). Its line for people is the
   * table's explanation with the {name} slots filled from `values`, the first time the code is raised.
   */
  add(code: WarningCode, example?: string, n = 1, values?: Readonly<Record<string, string | number | null>>): void {
    let w = this.byCode.get(code);
    if (!w) {
      w = { code, message: warningText(code, values), count: 0, examples: [] };
      this.byCode.set(code, w);
    }
    w.count += n;
    if (example !== undefined && w.examples.length < this.maxExamples) w.examples.push(example);
  }
  list(): FeedWarning[] {
    return [...this.byCode.values()];
  }
}

/** The table's explanation of a code with its {name} slots filled; a slot without a value is a bug. */
export function warningText(code: WarningCode, values: Readonly<Record<string, string | number | null>> = {}): string {
  return WARNINGS[code].explanation.replace(/\{(\w+)\}/g, (_, name: string) => {
    if (!Object.hasOwn(values, name)) throw new Error(`warning ${code}: no value for {${name}}`);
    return String(values[name]);
  });
}
