// Flat config shared by every workspace package.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import prettier from 'eslint-config-prettier';
import globals from 'globals';

export default tseslint.config(
  { ignores: ['**/node_modules/**', '**/dist/**', '.data/**', 'test-output/**', 'coverage/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node } },
    rules: {
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_' },
      ],
      '@typescript-eslint/consistent-type-imports': 'error',
      eqeqeq: ['error', 'smart'],
    },
  },
  {
    files: ['packages/kinetics/src/**/*.ts'],
    ignores: [
      'packages/kinetics/src/cli/**',
      'packages/kinetics/src/**/__tests__/**',
      // Node-only entry (@ebbtide/kinetics/node) and its worker pool.
      'packages/kinetics/src/node.ts',
      'packages/kinetics/src/pta/node-pool.ts',
    ],
    rules: {
      // The engine is pure: no Node built-ins, no I/O.
      'no-restricted-imports': [
        'error',
        { patterns: ['node:*', 'fs', 'path', 'os', 'child_process'] },
      ],
    },
  },
  {
    files: ['apps/web/**/*.{ts,tsx}'],
    languageOptions: { globals: { ...globals.browser } },
    plugins: { 'react-hooks': reactHooks },
    rules: reactHooks.configs.recommended.rules,
  },
  prettier,
);
