import { defineConfig } from 'vitest/config';

// Hermetic unit tests: next to the code, plus the committed reference vectors. No services needed.
export default defineConfig({
  test: {
    include: [
      'libs/**/*.test.ts',
      'services/**/*.test.ts',
      'test/reference/**/*.test.ts',
      'test/unit/**/*.test.ts',
    ],
    pool: 'forks',
    testTimeout: 20_000,
    coverage: {
      provider: 'v8',
      include: ['libs/**/*.ts', 'services/**/*.ts'],
      exclude: ['**/*.test.ts'],
      reporter: ['text-summary'],
      // The level the unit tests reached when the threshold was set (79.5 / 73.1 / 72.0 / 81.9 %): a change
      // that lowers it fails `npm test`. Raise these as coverage grows; never lower them.
      thresholds: { statements: 79, branches: 73, functions: 72, lines: 81 },
    },
  },
});
