// Temporary folders for a test file, removed when the file's tests end: tests write inputs and reports
// under the system's temporary folder and must not leave them behind run after run. The hook is set when
// a test file imports this module (at its top level), so a folder made while the tests are collected
// (in a describe) lives until the file's last test, like one made inside a test.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll } from 'vitest';

const made: string[] = [];
afterAll(() => {
  for (const d of made.splice(0)) rmSync(d, { recursive: true, force: true });
});

/** A new folder under the system's temporary folder, named prefix + random letters. */
export function tempDir(prefix: string): string {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  made.push(dir);
  return dir;
}
