import { describe, expect, test } from 'vitest';
import { firstSteps, groupFindingsByMachine, type CrewProgress, type OpenFinding } from '~/lib/home/home-cards';

const f = (
  machine: string,
  level: 'watch' | 'act',
  rule: string,
  measurand: string | null,
  drawnOn = '2026-11-01',
): OpenFinding => ({
  sample_id: `s-${machine}`,
  bottle_code: `B-${machine}`,
  drawn_on: drawnOn,
  machine_id: `m-${machine}`,
  machine_name: machine,
  level,
  rule_id: rule,
  measurand,
  sentence: `${rule} on ${machine}`,
});

describe('groupFindingsByMachine', () => {
  test('six coolant findings on one engine make one card, worst level and its finding first', () => {
    const findings = [
      f('Bruin', 'watch', 'climbing-trend', 'Na'),
      f('Bruin', 'watch', 'climbing-trend', 'K'),
      f('Bruin', 'act', 'coolant-markers', 'K'),
      f('Bruin', 'watch', 'baseline-jump', 'B'),
      f('Bruin', 'watch', 'baseline-jump', 'Na'),
      f('Bruin', 'watch', 'climbing-trend', 'B'),
    ];
    const cards = groupFindingsByMachine(findings, new Map([['m-Bruin', 'fix-first' as const]]));
    expect(cards).toHaveLength(1);
    expect(cards[0]).toMatchObject({
      machineName: 'Bruin',
      worst: 'act',
      count: 6,
      call: 'fix-first',
      main: { rule_id: 'coolant-markers' },
    });
  });

  test('cards sort by worst level, then the latest sample, then the name; a machine without a call says null', () => {
    const cards = groupFindingsByMachine(
      [
        f('Alder', 'watch', 'dirt', 'Si', '2026-11-20'),
        f('Cedar', 'act', 'fuel-dilution', 'FUEL', '2026-10-01'),
        f('Birch', 'watch', 'climbing-trend', 'Al', '2026-11-20'),
        f('Dune', 'watch', 'climbing-trend', 'Fe', '2026-11-25'),
      ],
      new Map(),
    );
    expect(cards.map((c) => [c.machineName, c.worst])).toEqual([
      ['Cedar', 'act'],
      ['Dune', 'watch'],
      ['Alder', 'watch'],
      ['Birch', 'watch'],
    ]);
    expect(cards.every((c) => c.call === null)).toBe(true);
  });

  test('no findings, no cards', () => expect(groupFindingsByMachine([], new Map())).toEqual([]));
});

describe('firstSteps', () => {
  const none: CrewProgress = {
    machines: 0,
    machinesWithOilChange: 0,
    drainCards: 0,
    samplesWithResults: 0,
    mechanicsOrInvites: 0,
    firstMachineId: null,
    firstMachineWithOilChangeId: null,
  };
  const done = (steps: ReturnType<typeof firstSteps>) => steps?.map((s) => [s.key, s.done]);

  test.each([
    [
      'a new crew, lead',
      none,
      'lead',
      [
        ['machine', false],
        ['oil-change', false],
        ['drain-card', false],
        ['import', false],
        ['invite', false],
      ],
    ],
    [
      'a new crew, rider: no invitation step',
      none,
      'rider',
      [
        ['machine', false],
        ['oil-change', false],
        ['drain-card', false],
      ],
    ],
    [
      'a machine added',
      { ...none, machines: 1, firstMachineId: 'm1' },
      'lead',
      [
        ['machine', true],
        ['oil-change', false],
        ['drain-card', false],
        ['import', false],
        ['invite', false],
      ],
    ],
    [
      'an oil change logged and a mechanic invited',
      {
        ...none,
        machines: 1,
        machinesWithOilChange: 1,
        mechanicsOrInvites: 1,
        firstMachineId: 'm1',
        firstMachineWithOilChangeId: 'm1',
      },
      'lead',
      [
        ['machine', true],
        ['oil-change', true],
        ['drain-card', false],
        ['import', false],
        ['invite', true],
      ],
    ],
    [
      'a drain card but no oil change yet',
      { ...none, machines: 1, drainCards: 1, firstMachineId: 'm1' },
      'mechanic',
      [
        ['machine', true],
        ['oil-change', false],
        ['drain-card', true],
        ['import', false],
      ],
    ],
  ] as const)('%s', (_name, progress, role, expected) => {
    expect(done(firstSteps(progress, role, 'c1'))).toEqual(expected);
  });

  test('the links go to the first machine once there is one', () => {
    const steps = firstSteps({ ...none, machines: 2, firstMachineId: 'm1' }, 'lead', 'c1')!;
    expect(steps.map((s) => s.href)).toEqual([
      '/machines/new',
      '/machines/m1/oil-change',
      '/machines/m1/drain-card',
      '/imports',
      '/crews/c1#invite-h',
    ]);
    expect(
      firstSteps(none, 'lead', 'c1')!
        .map((s) => s.href)
        .slice(1, 3),
    ).toEqual(['/machines/new', '/machines/new']);
  });

  const drained = {
    ...none,
    machines: 1,
    machinesWithOilChange: 1,
    drainCards: 1,
    firstMachineId: 'm1',
    firstMachineWithOilChangeId: 'm1',
  };
  test.each([
    ['lead, results not in yet: the import step is left', drained, 'lead', false],
    ['lead, results in', { ...drained, samplesWithResults: 1 }, 'lead', true],
    ['mechanic, results in', { ...drained, samplesWithResults: 1 }, 'mechanic', true],
    // A rider does not import, so the steps end with the drain card.
    ['rider, results not in yet', drained, 'rider', true],
  ] as const)('gone once an oil change, a drain card and (for importers) results are in: %s', (_l, p, role, gone) => {
    const steps = firstSteps(p, role, 'c1');
    expect(steps === null).toBe(gone);
    if (steps) expect(steps.filter((s) => !s.done).map((s) => s.key)).toEqual(['import', 'invite']);
  });
});
