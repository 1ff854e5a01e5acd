// Types of what scripts/make-scaled.mjs exports, for the TypeScript tests that import it (test/bench.test.ts).

export interface ZipEntryData {
  name: string;
  data: Buffer;
}

/** The suffix of copy c's ids (copy 0 keeps the original ids). */
export function copySuffix(c: number): string;
/** Shifts an H:MM:SS time by shiftS seconds; blank stays blank. */
export function shiftTime(text: string, shiftS: number): string;
/** Every entry of a zip, in archive order. */
export function readZip(file: string): Promise<ZipEntryData[]>;
/** Writes the feed enlarged k times to outFile; resolves to the number of stop_times rows written. */
export function writeScaled(entries: ZipEntryData[], k: number, outFile: string, options?: { shiftS?: number }): Promise<number>;
