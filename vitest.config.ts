import { defineConfig } from 'vitest/config';

// Tests run against the TypeScript sources; CLI tests run the built dist/, which test/helpers/cli.ts builds
// when a test file that needs it is loaded and dist/ is older than the sources.
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: 'forks',
  },
});
