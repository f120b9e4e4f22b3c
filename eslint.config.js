// Lint: the recommended JS and typescript-eslint sets, plus the house rule that libs/ stay pure.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  {
    ignores: [
      'dist/**',
      'node_modules/**',
      'coverage/**',
      '.venv/**',
      'services/dashboard/static/vendor/**',
      '.cache/**',
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/consistent-type-imports': 'error',
    },
  },
  {
    // libs/ are pure: no I/O, no clock, no process globals (DEVELOPERS.md, "The architecture in one picture").
    files: ['libs/**/*.ts'],
    ignores: ['libs/**/*.test.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            'node:fs*',
            'node:net',
            'node:http*',
            'node:child_process',
            'fs',
            'net',
            'http',
            '../../services/*',
          ],
        },
      ],
      'no-restricted-globals': ['error', 'process', 'setTimeout', 'setInterval', 'console'],
      'no-restricted-properties': [
        'error',
        { object: 'Date', property: 'now', message: 'libs take time as an argument' },
        { object: 'Math', property: 'random', message: 'libs take a seeded generator as an argument' },
      ],
    },
  },
  {
    files: ['services/dashboard/static/**/*.js', 'bin/**/*.js'],
    languageOptions: {
      globals: {
        window: 'readonly',
        document: 'readonly',
        fetch: 'readonly',
        EventSource: 'readonly',
        console: 'readonly',
        process: 'readonly',
        URL: 'readonly',
        localStorage: 'readonly',
        setTimeout: 'readonly',
        setInterval: 'readonly',
        clearTimeout: 'readonly',
        location: 'readonly',
        uPlot: 'readonly',
        navigator: 'readonly',
        matchMedia: 'readonly',
        requestAnimationFrame: 'readonly',
        ResizeObserver: 'readonly',
        Intl: 'readonly',
        CSS: 'readonly',
        devicePixelRatio: 'readonly',
      },
    },
  },
);
