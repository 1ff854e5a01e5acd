import { defineConfig } from 'vitest/config';
import { testCacheDir } from './test/helpers/cacheDir.js';

// The test run's download cache: never the user's real one (test/helpers/cacheDir.ts removes it at the end).
const cacheDir = testCacheDir(process.pid);
process.env.STOPSPAN_TEST_CACHE_ROOT = cacheDir;

// Tests run against the TypeScript sources; CLI tests run the built dist/, which test/helpers/cli.ts builds
// when a test file that needs it is loaded and dist/ is older than the sources.
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: 'forks',
    env: { STOPSPAN_CACHE_DIR: cacheDir },
    globalSetup: ['test/helpers/cacheDir.ts'],
  },
});
