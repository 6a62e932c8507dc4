import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import globals from 'globals';

// src/ is the pure core: it runs in Node and in browser workers, so it may not reach the shells,
// the DOM, React, Dexie or Electron. Only src/cli/ (the command line) may use Node's own modules.
const shellImports = {
  patterns: [
    { group: ['**/renderer/**', '**/main/**'], message: 'src/ is the core: it may not import the shells.' },
    { group: ['react', 'react-*', 'react/*', 'dexie', 'dexie-*', 'electron', 'recharts'], message: 'src/ stays free of UI, store and desktop libraries.' },
  ],
};
const domGlobals = ['window', 'document', 'navigator', 'localStorage', 'sessionStorage', 'indexedDB', 'HTMLElement'].map(
  (name) => ({ name, message: 'src/ is the core: no DOM.' }),
);

export default tseslint.config(
  { ignores: ['build/**', 'dist/**', 'release/**', 'node_modules/**', 'test-results/**', 'bench/out/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    files: ['renderer/**/*.{ts,tsx}'],
    languageOptions: { globals: { ...globals.browser } },
  },
  {
    files: ['src/**/*.ts'],
    ignores: ['src/cli/**'],
    rules: {
      'no-restricted-imports': ['error', { patterns: [...shellImports.patterns, { group: ['node:*', 'fs', 'path', 'zlib', 'os', 'child_process'], message: 'Only src/cli/ may use Node modules; the rest runs in browser workers too.' }] }],
      'no-restricted-globals': ['error', ...domGlobals],
    },
  },
  {
    files: ['src/cli/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', shellImports],
      'no-restricted-globals': ['error', ...domGlobals],
    },
  },
);
