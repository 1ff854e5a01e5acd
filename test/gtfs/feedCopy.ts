// Test helper: a throw-away copy of a fixture feed folder with some tables replaced or removed, and the
// same as a zip (yazl), so each error case is one line in its test.

import { cpSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeZip } from '../helpers/zip.js';

export const FIXTURES = join(import.meta.dirname, '..', '..', 'fixtures', 'gtfs');
export const BASIC = join(FIXTURES, 'vellmoor-basic');

const made: string[] = [];

/** Copies fixture folder `from` to a temp folder, then writes (string) or deletes (null) the given tables. */
export function feedCopy(changes: Record<string, string | null> = {}, from = BASIC): string {
  const dir = mkdtempSync(join(tmpdir(), 'stopspan-feed-'));
  made.push(dir);
  cpSync(from, dir, { recursive: true });
  rmSync(join(dir, 'README.md'), { force: true });
  for (const [name, text] of Object.entries(changes)) {
    if (text === null) rmSync(join(dir, name));
    else writeFileSync(join(dir, name), text);
  }
  return dir;
}

/** One table of the basic fixture with a line edited: (line text) => new text, by 1-based line number. */
export function editTable(name: string, line: number, edit: (old: string) => string, from = BASIC): string {
  const lines = readFileSync(join(from, name), 'utf8').split('\n');
  lines[line - 1] = edit(lines[line - 1]);
  return lines.join('\n');
}

/** Zips a folder's .txt files (optionally under a prefix such as 'gtfs/') into a temp .zip; returns its path. */
export async function zipFolder(
  dir: string,
  { prefix = '', extra = {} }: { prefix?: string; extra?: Record<string, Buffer | string> } = {},
): Promise<string> {
  const out = join(mkdtempSync(join(tmpdir(), 'stopspan-zip-')), 'feed.zip');
  made.push(out.slice(0, out.lastIndexOf('/')));
  const files: [string, Buffer | string][] = readdirSync(dir)
    .filter((n) => n.endsWith('.txt'))
    .sort()
    .map((f) => [prefix + f, readFileSync(join(dir, f))]);
  await writeZip(out, [...files, ...Object.entries(extra)]);
  return out;
}

export function cleanupCopies(): void {
  for (const d of made.splice(0)) rmSync(d, { recursive: true, force: true });
}
