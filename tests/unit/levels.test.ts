import { describe, expect, test } from 'vitest';
import {
  byLevelWorstFirst,
  CALL_DISPLAY,
  CALL_KINDS,
  LEVEL_DISPLAY,
  LEVELS,
  levelOfRank,
  levelRank,
  pickWorseLevel,
} from '~/lib/levels';
import { CALLS } from '~/lib/analysis/interval-call';
import { barNavFor, navFor } from '~/lib/navigation';

describe('levels', () => {
  test('each level has its own word and its own shape, so colour is never the only cue', () => {
    const words = new Set(Object.values(LEVEL_DISPLAY).map((d) => d.word));
    const shapes = new Set(Object.values(LEVEL_DISPLAY).map((d) => d.shape));
    expect(words.size).toBe(3);
    expect(shapes.size).toBe(3);
  });

  test.each([
    ['steady', 'watch'],
    ['watch', 'act'],
  ] as const)('%s ranks below %s', (low, high) => {
    expect(levelRank(low)).toBeLessThan(levelRank(high));
  });

  // The ranks stored and compared in SQL (worst_rank on the overview): common practice, no published source.
  test.each([
    ['steady', 0],
    ['watch', 1],
    ['act', 2],
  ] as const)('%s has rank %i, and that rank reads back as %s', (level, rank) => {
    expect(levelRank(level)).toBe(rank);
    expect(levelOfRank(rank)).toBe(level);
  });

  test.each([
    [-1, 'steady'],
    [3, 'steady'],
  ] as const)('an out-of-range rank %i reads as %s', (rank, level) => {
    expect(levelOfRank(rank)).toBe(level);
  });

  test.each([
    ['steady', 'steady', 'steady'],
    ['steady', 'watch', 'watch'],
    ['watch', 'steady', 'watch'],
    ['watch', 'act', 'act'],
    ['act', 'watch', 'act'],
    ['act', 'act', 'act'],
  ] as const)('the worse of %s and %s is %s', (a, b, worse) => {
    expect(pickWorseLevel(a, b)).toBe(worse);
  });

  test('sorting worst first puts act, then watch, then steady, and keeps ties in order', () => {
    const items = [
      { id: 1, level: 'watch' },
      { id: 2, level: 'steady' },
      { id: 3, level: 'act' },
      { id: 4, level: 'watch' },
    ] as const;
    expect([...items].sort((a, b) => byLevelWorstFirst(a.level, b.level)).map((i) => i.id)).toEqual([3, 1, 4, 2]);
    expect([...LEVELS]).toEqual(['steady', 'watch', 'act']);
  });
});

describe('interval calls', () => {
  test('every call the engine can make has its own word and meaning, fix-first included', () => {
    expect([...CALL_KINDS]).toEqual([...CALLS]);
    expect(CALL_KINDS).toContain('fix-first');
    expect(new Set(CALL_KINDS.map((c) => CALL_DISPLAY[c].word)).size).toBe(CALL_KINDS.length);
    expect(CALL_DISPLAY['fix-first'].meaning).toMatch(/interval unchanged/);
  });
});

describe('navigation', () => {
  test('marks the current page, including nested paths', () => {
    expect(navFor('/', false).find((i) => i.href === '/')?.current).toBe(true);
    expect(navFor('/elsewhere', false).find((i) => i.href === '/')?.current).toBe(false);
  });

  // The signed-in desktop bar fits one row at 1024 px: the crew page is reached by the crew's name beside the brand
  // and the rules page from the footer; the phone menu and a signed-out visitor's bar keep every item.
  test.each([
    [true, 'menu', ['/', '/machines', '/samples', '/overview', '/imports', '/crews', '/tools', '/rules', '/account']],
    [true, 'bar', ['/', '/machines', '/samples', '/overview', '/imports', '/tools', '/account']],
    [false, 'menu', ['/', '/tools', '/rules', '/sign-in', '/sign-up']],
    [false, 'bar', ['/', '/tools', '/rules', '/sign-in', '/sign-up']],
  ] as const)('signed in %s, %s', (signedIn, where, hrefs) => {
    const items = where === 'menu' ? navFor('/crews/x', signedIn) : barNavFor('/crews/x', signedIn);
    expect(items.map((i) => i.href)).toEqual(hrefs);
    expect(items.filter((i) => i.current).map((i) => i.href)).toEqual(signedIn && where === 'menu' ? ['/crews'] : []);
  });
});
