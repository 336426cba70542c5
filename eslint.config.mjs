import js from '@eslint/js';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  {
    ignores: [
      'node_modules/',
      'dist/',
      'server/dist/',
      'watcher/dist/',
      '.angular/',
      'data/',
      'test-output/',
      'coverage/',
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    files: ['**/*.ts'],
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      // `import { z } from 'zod'` keeps all of zod (every locale included) in the browser's first script;
      // the namespace import lets the bundler drop what is not used (330 kB of the main script).
      'no-restricted-syntax': [
        'error',
        {
          selector: "ImportDeclaration[source.value='zod'] > ImportSpecifier",
          message:
            "Import zod as a namespace: import * as z from 'zod' (a named import keeps all of zod in the bundle).",
        },
      ],
    },
  },
  {
    files: ['**/*.js', '**/*.cjs'],
    languageOptions: {
      sourceType: 'commonjs',
      globals: { require: 'readonly', module: 'writable', __dirname: 'readonly', process: 'readonly' },
    },
    rules: { '@typescript-eslint/no-require-imports': 'off' },
  },
  {
    files: ['**/*.mjs'],
    languageOptions: {
      globals: {
        process: 'readonly',
        console: 'readonly',
        setTimeout: 'readonly',
        URL: 'readonly',
        fetch: 'readonly',
      },
    },
  },
  {
    // The shared modules stay pure: the analysis module and the API contracts run on the server, in the
    // browser and in the watcher, so they import nothing of Node, Express, TypeORM or Angular (the
    // contracts: zod and the analysis module only).
    files: ['server/src/analysis/**/*.ts', 'server/src/contracts/**/*.ts'],
    ignores: ['**/__tests__/**', '**/*.spec.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: [
                'node:*',
                'fs',
                'path',
                'os',
                'crypto',
                'worker_threads',
                'child_process',
                'http',
                'https',
                'stream',
                'url',
                'util',
              ],
              message: 'Shared modules run in the browser too: no Node built-ins.',
            },
            {
              group: [
                'express',
                'express-*',
                'typeorm',
                '@angular/*',
                'rxjs',
                'better-sqlite3',
                'piscina',
                'chokidar',
                'pdfkit',
                'nodemailer',
              ],
              message: 'Shared modules are pure: no framework or database imports.',
            },
            {
              group: ['../*', '!../analysis', '!../analysis/*'],
              message: 'Contracts import only zod, the analysis module and their own files.',
            },
          ],
        },
      ],
    },
  },
);
