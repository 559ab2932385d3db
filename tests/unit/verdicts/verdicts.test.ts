import { describe, expect, test } from 'vitest';
import {
  callTone,
  describeCallWithDistance,
  describeVerdictReason,
  roundAbout,
  sortWorstFirst,
} from '~/lib/verdicts/verdicts';
import { buildVerdictBanner } from '~/lib/machines/machine-page-view';
import { describeShippedWait, pickSamplePrimary } from '~/lib/samples/sample-page-view';
import { buildQueueNotice } from '~/lib/home/home-page-view';
import type { Verdict } from '~/lib/verdicts/verdicts';

describe('call words with a distance', () => {
  // 1 mi = 1.609344 km exactly (NIST SP 811); "about" rounds to 50 mi/km or 5 h (common practice, no published source).
  test.each([
    ['shorten', 700, 'km', 'Shorten to about 700 km'],
    ['shorten', 712, 'km', 'Shorten to about 700 km'],
    ['shorten', 1609.344, 'mi', 'Shorten to about 1,000 mi'],
    ['stretch', 6030, 'km', 'Stretch to about 6,050 km'],
    ['hold', 5000, 'km', 'Hold at about 5,000 km'],
    ['shorten', 12, 'h', 'Shorten to about 10 h'],
    ['shorten', 10, 'km', 'Shorten to about 50 km'],
    ['fix-first', 700, 'km', 'Fix first'],
    ['hold', null, 'km', 'Hold'],
  ] as const)('%s %s %s → %s', (call, interval, meter, words) => {
    expect(describeCallWithDistance(call, interval, meter)).toBe(words);
  });

  test('roundAbout never says "about 0"', () => {
    expect(roundAbout(3, 'km')).toBe('50 km');
  });

  test.each([
    ['shorten', 'urgent'],
    ['fix-first', 'urgent'],
    ['hold', 'calm'],
    ['stretch', 'calm'],
  ] as const)('%s is %s', (call, tone) => {
    expect(callTone(call)).toBe(tone);
  });
});

describe('sortWorstFirst', () => {
  test('act, watch, steady, then rows without results; ties keep their order', () => {
    const rows = [
      { n: 'a', l: 'steady' },
      { n: 'b', l: null },
      { n: 'c', l: 'act' },
      { n: 'd', l: 'watch' },
      { n: 'e', l: 'act' },
    ] as const;
    expect(sortWorstFirst(rows, (r) => r.l).map((r) => r.n)).toEqual(['c', 'e', 'd', 'a', 'b']);
  });
});

const verdict = (over: Partial<Verdict>): Verdict => ({
  sampleId: 's1',
  machineId: 'm1',
  level: 'act',
  call: 'shorten',
  nextInterval: 700,
  top: { ruleId: 'climbing-trend', measurand: 'Fe' },
  ...over,
});

describe('the verdict banner of a machine page', () => {
  test('the latest sample with results at act gives level, reason, call with distance and the review link', () => {
    const samples = [
      { id: 's0', state: 'drawn' as const },
      { id: 's1', state: 'results_in' as const },
    ];
    const b = buildVerdictBanner(samples, new Map([['s1', verdict({})]]), 'km');
    expect(b).toMatchObject({
      level: 'act',
      call: 'shorten',
      callText: 'Shorten to about 700 km',
      href: '/samples/s1#review',
      action: 'Review sample',
    });
    expect(b!.reason.length).toBeGreaterThan(0);
    expect(b!.reason).not.toMatch(/climbing-trend/);
  });

  test.each([
    ['steady', [{ id: 's1', state: 'results_in' as const }], verdict({ level: 'steady' })],
    ['no results', [{ id: 's1', state: 'shipped' as const }], verdict({})],
  ])('no banner when %s', (_n, samples, v) => {
    expect(buildVerdictBanner(samples, new Map([['s1', v]]), 'km')).toBeNull();
  });

  test('a reviewed sample is opened, not reviewed again', () => {
    const b = buildVerdictBanner(
      [{ id: 's1', state: 'reviewed' }],
      new Map([['s1', verdict({ level: 'watch' })]]),
      'km',
    );
    expect(b?.action).toBe('Open sample');
  });

  test('a steady verdict reads as steady', () => {
    expect(describeVerdictReason({ level: 'steady', top: null })).toMatch(/normal/);
  });
});

describe('the sample page', () => {
  test.each([
    ['drawn', true, true, 'tag'],
    ['drawn', false, true, 'ship'],
    ['shipped', false, true, null],
    ['results_in', false, true, 'confirm'],
    ['results_in', false, false, null],
    ['reviewed', false, true, null],
  ] as const)('%s (registered %s, reviewer %s) → %s', (state, registered, reviewer, primary) => {
    expect(pickSamplePrimary(state, registered, reviewer)).toBe(primary);
  });

  // 21 days: the product's overdue limit (common practice, no published source).
  test.each([
    ['shipped', '2026-11-01', '2026-12-02', /Shipped 31 days ago/],
    ['shipped', '2026-11-11', '2026-12-02', /Shipped 21 days ago/],
    ['shipped', '2026-11-12', '2026-12-02', null],
    ['results_in', '2026-01-01', '2026-12-02', null],
    ['shipped', null, '2026-12-02', null],
  ] as const)('%s on %s, today %s', (state, shippedOn, today, words) => {
    const r = describeShippedWait(state, shippedOn, today);
    if (words === null) expect(r).toBeNull();
    else expect(r).toMatch(words);
  });
});

describe('the review queue notice', () => {
  const id = '7d0f6a7e-3f4c-4b8e-9a37-2a8a4e2b1c11';
  test.each([
    [`steady_confirmed=12&undo=${id}`, { kind: 'confirmed', words: 'Confirmed 12 steady calls.', undoIds: id }],
    ['steady_confirmed=0', { kind: 'confirmed', words: 'No steady calls were waiting.', undoIds: '' }],
    [
      'steady_confirmed=2&undo=not-an-id,<b>x</b>',
      { kind: 'confirmed', words: 'Confirmed 2 steady calls.', undoIds: '' },
    ],
    ['steady_undone=1', { kind: 'undone', words: 'Undone: 1 sample back to results in.' }],
    ['steady_error=undo_expired', { kind: 'error', words: expect.stringMatching(/time to undo has passed/) }],
    ['steady_error=<script>', { kind: 'error', words: 'That did not work; nothing was changed.' }],
    ['steady_confirmed=' + '9'.repeat(50), null],
    ['', null],
  ])('%s', (query, notice) => {
    expect(buildQueueNotice(new URLSearchParams(query))).toEqual(notice);
  });
});
