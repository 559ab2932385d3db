import { describe, expect, test } from 'vitest';
import type { SampleState } from '~/lib/db/database';
import { canMoveSample, SAMPLE_TRANSITIONS } from '~/lib/samples/sample-lifecycle';

// The lifecycle as the product brief describes it (drawn → shipped → results in → reviewed), plus the two
// moves a lab import makes on a sample that already has results (a "replace").
describe('canMoveSample', () => {
  test.each<[SampleState, SampleState, boolean]>([
    ['drawn', 'shipped', true],
    ['shipped', 'shipped', false],
    ['results_in', 'shipped', false],
    ['reviewed', 'shipped', false],
    ['drawn', 'results_in', true],
    ['shipped', 'results_in', true],
    ['results_in', 'results_in', true],
    ['reviewed', 'results_in', true],
    ['results_in', 'reviewed', true],
    ['drawn', 'reviewed', false],
    ['shipped', 'reviewed', false],
    ['reviewed', 'reviewed', false],
    ['drawn', 'drawn', false],
    ['shipped', 'drawn', false],
    ['results_in', 'drawn', false],
    ['reviewed', 'drawn', false],
  ])('%s → %s: %s', (from, to, allowed) => {
    expect(canMoveSample(from, to)).toBe(allowed);
  });

  test('every state has an entry, and nothing moves back to drawn', () => {
    expect(Object.keys(SAMPLE_TRANSITIONS).sort()).toEqual(['drawn', 'results_in', 'reviewed', 'shipped']);
    expect(SAMPLE_TRANSITIONS.drawn).toEqual([]);
  });
});
