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
      // Two points under the level the unit tests reached at 0.2.0 (89.1 / 83.1 / 87.3 / 91.4 %): a change
      // that lowers coverage that far fails `npm test`. Raise these as coverage grows; never lower them.
      thresholds: { statements: 87, branches: 81, functions: 85, lines: 89 },
    },
  },
});
