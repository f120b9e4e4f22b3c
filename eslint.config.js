// Lint: the recommended JS and typescript-eslint sets, plus the house rule that libs/ stay pure.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';

// What a pure library (libs/) may not import: I/O modules and the services.
const PURE_LIB_IMPORTS = [
  'node:fs*',
  'node:net',
  'node:http*',
  'node:child_process',
  'fs',
  'net',
  'http',
  '../../services/*',
];

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
      'no-restricted-imports': ['error', { patterns: PURE_LIB_IMPORTS }],
      'no-restricted-globals': ['error', 'process', 'setTimeout', 'setInterval', 'console'],
      'no-restricted-properties': [
        'error',
        { object: 'Date', property: 'now', message: 'libs take time as an argument' },
        { object: 'Math', property: 'random', message: 'libs take a seeded generator as an argument' },
      ],
    },
  },
  {
    // libs/contract is the base layer: it imports no feature package (alert schemas live in the contract).
    files: ['libs/contract/**/*.ts'],
    ignores: ['libs/contract/**/*.test.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: PURE_LIB_IMPORTS },
            {
              group: ['../alerts', '../alerts/*', '../../libs/alerts', '../../libs/alerts/*'],
              message:
                'libs/contract depends on no feature package; move the shared piece into libs/contract.',
            },
          ],
        },
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
