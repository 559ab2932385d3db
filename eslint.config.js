// @ts-check
// The linter finds mistakes; Prettier owns the layout (eslint-config-prettier turns every formatting rule off,
// max-len included). Type-aware rules are left out: `astro check` already type-checks everything, and the
// untyped rules run in seconds on two cores.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import astro from 'eslint-plugin-astro';
import prettier from 'eslint-config-prettier';
import globals from 'globals';

/** Lucia is deprecated upstream: only the session module and its Lucia instance may import it. */
const LUCIA_GATE = ['src/lib/auth/session.ts', 'src/lib/auth/lucia.ts'];

const luciaImports = {
  group: ['lucia', 'lucia/*', '@lucia-auth/*'],
  message: 'Use src/lib/auth/session.ts; Lucia stays behind it.',
};
const deepRelativeImports = {
  group: ['../../../*'],
  message: "Use the '~/' alias (src/) instead of climbing more than two folders.",
};

export default tseslint.config(
  {
    ignores: ['dist/', '.astro/', '.data/', 'node_modules/', 'tests/bench/results/', 'tests/e2e/screenshots/'],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...astro.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    linterOptions: { reportUnusedDisableDirectives: 'error' },
    rules: {
      // Unused names are mistakes, except a leading underscore that says "deliberately ignored".
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none', ignoreRestSiblings: true },
      ],
      // The readers refuse control characters on purpose, so their patterns name them.
      'no-control-regex': 'off',
    },
  },
  {
    // Kysely's migrations take Kysely<any>: they must not depend on today's schema (Kysely's migration guide).
    files: ['migrations/**'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
  {
    files: ['src/**'],
    ignores: LUCIA_GATE,
    rules: { 'no-restricted-imports': ['error', { patterns: [luciaImports, deepRelativeImports] }] },
  },
  {
    files: ['tests/**', 'scripts/**', 'sample-data/**', 'migrations/**'],
    rules: { 'no-restricted-imports': ['error', { patterns: [luciaImports] }] },
  },
  prettier,
);
