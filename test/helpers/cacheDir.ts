// The download cache of a test run: a folder of its own under the system's temporary folder (never the
// user's real cache), named in vitest.config.ts for every test process and the commands they start, and
// removed when the run ends.

import { rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** The cache folder of the test run whose main process is `pid`. */
export function testCacheDir(pid: number): string {
  return join(tmpdir(), `stopspan-test-cache-${pid}`);
}

/** vitest's global teardown: the run's cache folder goes. */
export function teardown(): void {
  const dir = process.env.STOPSPAN_TEST_CACHE_ROOT;
  if (dir) rmSync(dir, { recursive: true, force: true });
}
