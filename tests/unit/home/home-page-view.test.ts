import { describe, expect, test } from 'vitest';
import type { MachineCard } from '~/lib/home/home-cards';
import {
  buildHomeView,
  buildWelcomeNotice,
  describeDue,
  describeHomeCard,
  describeMore,
  LIST_MAX,
} from '~/lib/home/home-page-view';
import type { DueMachine } from '~/lib/home/home.service';
import { CALL_DISPLAY } from '~/lib/levels';

const progress = {
  machines: 1,
  machinesWithOilChange: 1,
  drainCards: 1,
  samplesWithResults: 1,
  mechanicsOrInvites: 1,
  firstMachineId: 'm1',
  firstMachineWithOilChangeId: 'm1',
};
const empty = { drawn: [], overdue: [], waiting: [], cards: [], due: [], progress };
const finding = {
  sample_id: 's1',
  bottle_code: 'K7MQ4XH',
  drawn_on: '2026-03-01',
  machine_id: 'm1',
  machine_name: 'Trail 450',
  level: 'act' as const,
  rule_id: 'fixed-limit',
  measurand: 'Fe',
  sentence: 'Iron at 120 ppm.',
};
const card: MachineCard = {
  machineId: 'm1',
  machineName: 'Trail 450',
  sampleId: 's1',
  bottleCode: 'K7MQ4XH',
  drawnOn: '2026-03-01',
  worst: 'act',
  main: finding,
  count: 3,
  call: 'shorten',
};
const dueBase: DueMachine = {
  id: 'm2',
  name: 'Road twin',
  meter: 'km',
  due: { due: true, reasons: ['date'], remaining: null, daysLeft: -3 },
  estimate: null,
  target: 'call',
  nextSampleOn: '2026-02-01',
  nextSampleOdometer: null,
  overdue: { days: 3, words: 'due 3 days ago' },
};

describe('home lists', () => {
  test.each([
    [0, ''],
    [LIST_MAX, ''],
    [LIST_MAX + 1, 'and 1 more'],
    [20, 'and 12 more'],
  ])('%i entries: "%s"', (n, more) => expect(describeMore(n)).toBe(more));

  test.each([
    [3, 'All 3 findings'],
    [1, 'The finding'],
  ])('a card with %i findings links "%s"', (count, label) => {
    expect(describeHomeCard({ ...card, count }).findingsLabel).toBe(label);
  });

  test('a card names its reason, its call and its links', () => {
    expect(describeHomeCard(card)).toMatchObject({
      machineHref: '/machines/m1',
      findingsHref: '/samples/s1#findings',
      sentence: 'Iron at 120 ppm.',
      call: CALL_DISPLAY.shorten,
      worst: 'act',
    });
    expect(describeHomeCard({ ...card, call: null }).call).toBeNull();
  });

  test.each([
    [
      'late by date',
      dueBase,
      { overdueWords: 'due 3 days ago', dueOn: '2026-02-01', dueAt: null, fromManufacturer: false },
    ],
    [
      'due today, not yet late',
      { ...dueBase, overdue: { days: 0, words: 'due today' } },
      { overdueWords: null, dueOn: '2026-02-01' },
    ],
    [
      'by the meter estimate, from the manual',
      {
        ...dueBase,
        due: { due: true, reasons: ['odometer'], remaining: -50, daysLeft: null },
        nextSampleOn: null,
        nextSampleOdometer: 12_000,
        overdue: null,
        target: 'manufacturer',
        estimate: { odometer: 12_050, pacePerDay: 20, basis: 'pace', lastDate: '2026-02-01', lastOdometer: 11_500 },
      },
      {
        overdueWords: null,
        dueOn: null,
        dueAt: 'Due at 12,000 km; from recent riding it is probably at about 12,050 km. ',
        fromManufacturer: true,
      },
    ],
  ] as [string, DueMachine, object][])('%s', (_what, m, expected) => {
    expect(describeDue(m)).toMatchObject({ href: '/machines/m2', name: 'Road twin', ...expected });
  });
});

describe('the crew home model', () => {
  test('nothing waiting, no first steps for a crew that has started', () => {
    expect(buildHomeView(empty, 'lead', 'c1')).toMatchObject({ clear: true, steps: null, cards: [], cardsMore: '' });
  });

  test('sample lists link the right page, say when, and stop at the list size', () => {
    const drawn = Array.from({ length: LIST_MAX + 2 }, (_, i) => ({
      id: `d${i}`,
      bottle_code: `B${i}`,
      machine_name: 'Trail 450',
      drawn_on: '2026-03-01',
    }));
    const v = buildHomeView(
      {
        ...empty,
        drawn,
        waiting: [{ id: 'w1', bottle_code: 'W1', machine_name: 'Road twin', drawn_on: '2026-02-20' }],
        overdue: [{ id: 'o1', bottle_code: 'O1', machine_name: 'Road twin', shipped_on: '2026-01-02' }],
      },
      'rider',
      'c1',
    );
    expect(v.clear).toBe(false);
    expect(v.waiting).toEqual([
      {
        href: '/samples/w1#review',
        machineName: 'Road twin',
        bottleCode: 'W1',
        when: '20 Feb 2026',
        whenOn: '2026-02-20',
      },
    ]);
    expect(v.overdue).toEqual([
      {
        href: '/samples/o1',
        machineName: 'Road twin',
        bottleCode: 'O1',
        when: 'shipped 2 Jan 2026',
        whenOn: '2026-01-02',
      },
    ]);
    expect(v.drawn).toHaveLength(LIST_MAX);
    expect(v.drawn[0]).toEqual({
      href: '/samples/d0',
      machineName: 'Trail 450',
      bottleCode: 'B0',
      when: 'drawn 1 Mar 2026',
      whenOn: '2026-03-01',
    });
    expect(v.drawnMore).toBe('and 2 more');
  });

  test('a new crew gets its first steps', () => {
    const v = buildHomeView(
      { ...empty, progress: { ...progress, machinesWithOilChange: 0, drainCards: 0 } },
      'lead',
      'c1',
    );
    expect(v.steps?.map((s) => s.key)).toEqual(['machine', 'oil-change', 'drain-card', 'import', 'invite']);
  });
});

describe('one filled button on the home, chosen by state', () => {
  const watchCard: MachineCard = {
    ...card,
    machineId: 'm2',
    sampleId: 's2',
    worst: 'watch',
    main: { ...finding, level: 'watch' },
  };
  const waiting = (id: string) => ({ id, bottle_code: 'B', machine_name: 'M', drawn_on: '2026-03-01' });
  const fresh = { ...progress, machines: 0, machinesWithOilChange: 0, drainCards: 0, samplesWithResults: 0 };
  test.each([
    // name, input, role, expected primary
    [
      'an act machine waiting for review beats the steady confirmation',
      { ...empty, cards: [card], waiting: [waiting('s1')], steadyCount: 4 },
      'mechanic',
      { kind: 'card', machineId: 'm1', label: 'Review this sample', href: '/samples/s1#review' },
    ],
    [
      'an act machine already reviewed: its findings',
      { ...empty, cards: [card], steadyCount: 4 },
      'lead',
      { kind: 'card', machineId: 'm1', label: 'Read the findings', href: '/samples/s1#findings' },
    ],
    [
      'a rider is not offered a review',
      { ...empty, cards: [card], waiting: [waiting('s1')] },
      'rider',
      { kind: 'card', machineId: 'm1', label: 'Read the findings', href: '/samples/s1#findings' },
    ],
    [
      'steady calls waiting and nothing at act',
      { ...empty, cards: [watchCard], steadyCount: 2 },
      'lead',
      { kind: 'confirm-steady' },
    ],
    [
      'only a watch machine',
      { ...empty, cards: [watchCard], waiting: [waiting('s2')] },
      'lead',
      { kind: 'card', machineId: 'm2', label: 'Review this sample', href: '/samples/s2#review' },
    ],
    [
      'a new crew: its next first step',
      { ...empty, progress: fresh },
      'lead',
      { kind: 'step', key: 'machine', label: 'Add a machine', href: '/machines/new' },
    ],
    ['nothing to do', empty, 'lead', null],
  ] as const)('%s', (_name, home, role, primary) => {
    expect(
      buildHomeView({ ...home, cards: [...home.cards] } as Parameters<typeof buildHomeView>[0], role, 'c1').primary,
    ).toEqual(primary);
  });

  test('the steady confirmation is only for those who confirm calls', () => {
    const v = buildHomeView({ ...empty, steadyCount: 3 }, 'rider', 'c1');
    expect(v.steadyConfirm).toBeNull();
    expect(v.primary).toBeNull();
  });
});

describe('the banner after sign-up', () => {
  test.each([
    ['welcome=1', false, 'Welcome to Sumpwise. We sent a link to ada@example.test to confirm the address.'],
    ['welcome=1', true, 'Welcome to Sumpwise.'],
    ['', false, null],
    ['welcome=<b>x</b>', false, null],
  ])('?%s, confirmed %s', (query, emailVerified, words) => {
    expect(buildWelcomeNotice(new URLSearchParams(query), { email: 'ada@example.test', emailVerified })).toBe(words);
  });
});
