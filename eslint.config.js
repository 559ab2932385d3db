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
      // A closure defined before the one assignment may read the variable (a worker id set once it exists).
      'prefer-const': ['error', { ignoreReadBeforeAssign: true }],
    },
  },
  {
    // Kysely<any> is the type of code that must work on any schema: migrations (Kysely's migration guide),
    // the database plumbing (migrator, bulk copy), the health ping.
    files: ['migrations/**', 'src/lib/db/**', 'src/lib/health/**'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
  {
    // Tests read JSON answers and rows of any table loosely (their assertions check the shape), and feed the
    // code hostile input on purpose: control characters, numbers a double cannot hold.
    files: ['tests/**'],
    rules: { '@typescript-eslint/no-explicit-any': 'off', 'no-control-regex': 'off', 'no-loss-of-precision': 'off' },
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
