import { describe, expect, test } from 'vitest';
import { chooseOverviewPrimary } from '~/lib/overview/overview-view';

const row = (name: string, worst: 'steady' | 'watch' | 'act' | null, state = 'results_in') => ({
  name,
  worst,
  lastSample: worst ? { id: `s-${name}`, bottleCode: 'B1', drawnOn: '2026-03-01', state } : null,
});

describe('the overview’s one filled button', () => {
  test.each([
    ['act beats an earlier watch', [row('A', 'watch'), row('B', 'act')], true, ['Review B', '/samples/s-B#review']],
    ['the first of equals', [row('A', 'watch'), row('B', 'watch')], true, ['Review A', '/samples/s-A#review']],
    ['already reviewed: its findings', [row('A', 'act', 'reviewed')], true, ['Findings of A', '/samples/s-A#findings']],
    ['a rider reads the findings', [row('A', 'act')], false, ['Findings of A', '/samples/s-A#findings']],
    ['all steady: none', [row('A', 'steady'), row('B', null)], true, null],
    ['no rows: none', [], true, null],
  ] as const)('%s', (_name, rows, reviewer, expected) => {
    const p = chooseOverviewPrimary(rows, reviewer);
    expect(p && [p.label, p.href]).toEqual(expected);
  });
});
