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
    },
  },
});
