import { defineConfig } from 'vitest/config';

// Tests run against the TypeScript sources; CLI tests run the built dist/ (npm install builds it).
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: 'forks',
    globalSetup: ['test/globalSetup.ts'],
  },
});
