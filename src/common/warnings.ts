// Recoverable oddities found while reading or analysing: counted, a few examples kept, never fatal.

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
  add(code: string, message: string, example?: string, n = 1): void {
    let w = this.byCode.get(code);
    if (!w) {
      w = { code, message, count: 0, examples: [] };
      this.byCode.set(code, w);
    }
    w.count += n;
    if (example !== undefined && w.examples.length < this.maxExamples) w.examples.push(example);
  }
  list(): FeedWarning[] {
    return [...this.byCode.values()];
  }
}
