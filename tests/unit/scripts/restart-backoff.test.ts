import { describe, expect, test } from 'vitest';
import { nextRestart, QUICK_DEATH_MS } from '../../../scripts/lib/restart-backoff';

// Pauses are the supervisor's own choice (common practice, no published source): 250 ms doubling to 10 s.
describe('nextRestart', () => {
  test.each([
    { before: 0, lived: 60_000, quickDeaths: 0, delayMs: 0 },
    { before: 4, lived: QUICK_DEATH_MS, quickDeaths: 0, delayMs: 0 },
    { before: 0, lived: 100, quickDeaths: 1, delayMs: 250 },
    { before: 1, lived: 100, quickDeaths: 2, delayMs: 500 },
    { before: 2, lived: 100, quickDeaths: 3, delayMs: 1_000 },
    { before: 5, lived: 100, quickDeaths: 6, delayMs: 8_000 },
    { before: 6, lived: 100, quickDeaths: 7, delayMs: 10_000 },
    { before: 50, lived: 100, quickDeaths: 51, delayMs: 10_000 },
  ])(
    'after $before start-up deaths, one that lived $lived ms: $delayMs ms pause',
    ({ before, lived, quickDeaths, delayMs }) => {
      expect(nextRestart(before, lived)).toEqual({ quickDeaths, delayMs });
    },
  );
});
