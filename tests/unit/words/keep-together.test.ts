import { describe, expect, test } from 'vitest';
import { keepTogether } from '~/lib/words/keep-together';

describe('keepTogether', () => {
  test.each([
    ['hollow-creek-oil-lab-2025-01-19.csv', ['hollow-creek-oil-lab-', '[2025-01-19]', '.csv']],
    ['Results SW-1041 and SW-1042', ['Results ', '[SW-1041]', ' and ', '[SW-1042]']],
    ['10W-40 then 15W-50', ['[10W-40]', ' then ', '[15W-50]']],
    ['2026-03-02', ['[2026-03-02]']],
    ['plain-text-no-tokens', ['plain-text-no-tokens']],
    ['', []],
  ])('%s', (text, runs) => {
    const got = keepTogether(text);
    expect(got.map((r) => (r.keep ? `[${r.text}]` : r.text))).toEqual(runs);
    expect(got.map((r) => r.text).join('')).toBe(text);
  });
});
