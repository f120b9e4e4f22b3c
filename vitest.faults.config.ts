import { defineConfig } from 'vitest/config';

// Fault-injection suite: real services, one case at a time, each bounded in time.
export default defineConfig({
  test: {
    include: ['test/faults/**/*.test.ts'],
    pool: 'forks',
    fileParallelism: false,
    testTimeout: 240_000,
    hookTimeout: 120_000,
  },
});
