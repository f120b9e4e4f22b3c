import { defineConfig } from 'vitest/config';

// Integration and end-to-end tests against the real services started by deploy/dev/services.sh.
export default defineConfig({
  test: {
    include: ['test/integration/**/*.test.ts', 'test/e2e/**/*.test.ts'],
    pool: 'forks',
    fileParallelism: false,
    testTimeout: 120_000,
    hookTimeout: 120_000,
  },
});
