import { describe, expect, test } from 'vitest';
import { CALL_DISPLAY, CALL_KINDS, LEVEL_DISPLAY, levelRank } from '~/lib/levels';
import { CALLS } from '~/lib/analysis/interval-call';
import { navFor } from '~/lib/navigation';

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
});
