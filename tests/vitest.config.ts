import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));

// Three kinds of test, each runnable alone: `vitest run --config tests/vitest.config.ts --project unit`.
export default defineConfig({
  root,
  resolve: { alias: { '~': fileURLToPath(new URL('../src', import.meta.url)) } },
  test: {
    // Off by default (one file runs fast); `npm test` turns it on for the unit project and fails below the
    // thresholds. Repositories and services are exercised by the integration tests, which this measure leaves
    // out, so roughly half of src/lib counts as uncovered here: the figure guards the pure modules' share.
    // AST-aware remapping counts statements and branches as written (Vitest's default from version 4).
    coverage: {
      provider: 'v8',
      include: ['src/lib/**/*.{ts,tsx}'],
      reporter: ['text-summary'],
      reportsDirectory: '.data/coverage',
      experimentalAstAwareRemapping: true,
      // A few points under the unit figures measured when the thresholds were set (statements 55.6 %,
      // branches 55.4 %, functions 45.7 %, lines 56.0 %): a drop fails, ordinary churn does not.
      thresholds: {
        'src/lib/**': { statements: 52, branches: 52, functions: 42, lines: 52 },
      },
    },
    projects: [
      {
        extends: true,
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' },
      },
      {
        extends: true,
        test: {
          name: 'integration',
          include: ['tests/integration/**/*.test.ts'],
          globalSetup: ['tests/integration/global-setup.ts'],
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          globalSetup: ['tests/e2e/global-setup.ts'],
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
    ],
  },
});
