import { describe, expect, test } from 'vitest';
import type { CrewMembership } from '~/lib/auth/types';
import { buildCrewHomeView, type CrewHomeInput } from '~/lib/crews/crew-home-view';

const joinedAt = new Date('2026-01-01T00:00:00Z');
const ada = { userId: 'u1', displayName: 'Ada', email: 'ada@example.test', role: 'lead' as const, joinedAt };
const ben = { userId: 'u2', displayName: 'Ben', email: 'ben@example.test', role: 'rider' as const, joinedAt };
const at = new Date('2026-03-04T05:06:07Z');
const invitation = { id: 'i1', email: 'cy@example.test', role: 'mechanic' as const, expiresAt: at, createdAt: at };
const school: CrewMembership = { crewId: 'c1', crewName: 'Valley school', role: 'lead' };
const own: CrewMembership = { crewId: 'c2', crewName: 'Ada’s crew', role: 'lead' };

function input(over: Partial<CrewHomeInput>): CrewHomeInput {
  return {
    userId: 'u1',
    current: school,
    crews: [school],
    members: [ada, ben],
    invitations: [],
    creating: false,
    ...over,
  };
}

describe('the crew page opens on the current crew', () => {
  test.each([
    // role, invite link, page link shown to the viewer
    ['lead', '/crews/c1#invite-h'],
    ['mechanic', null],
    ['rider', null],
  ] as const)('a %s gets the Invite link %s', (role, inviteHref) => {
    const view = buildCrewHomeView(input({ current: { ...school, role }, invitations: [invitation] }));
    expect(view.current?.inviteHref).toBe(inviteHref);
    expect(view.current?.crewHref).toBe('/crews/c1');
    expect(view.current?.roleWord).toBe(role);
    // Only a lead sees who is invited (the same rule as the crew's own page).
    expect(view.current?.invitations.length).toBe(role === 'lead' ? 1 : 0);
  });

  test('members keep their roles and the viewer is marked', () => {
    const view = buildCrewHomeView(input({}));
    expect(view.current?.members).toEqual([
      { userId: 'u1', label: 'Ada (you)', email: 'ada@example.test', roleLabel: 'Lead' },
      { userId: 'u2', label: 'Ben', email: 'ben@example.test', roleLabel: 'Rider' },
    ]);
    expect(view.current?.alone).toBe(false);
  });

  test.each([
    ['only the lead, nobody invited', [ada], [], true],
    ['only the lead, one invitation out', [ada], [invitation], false],
    ['lead and a rider', [ada, ben], [], false],
  ] as const)('empty state: %s', (_label, members, invitations, alone) => {
    expect(buildCrewHomeView(input({ members: [...members], invitations: [...invitations] })).current?.alone).toBe(
      alone,
    );
  });

  test('other crews are listed without the current one; starting a crew stays folded', () => {
    const view = buildCrewHomeView(input({ crews: [school, own] }));
    expect(view.others).toEqual([{ crewId: 'c2', name: 'Ada’s crew', roleLabel: 'Lead', href: '/crews/c2' }]);
    expect(view.createOpen).toBe(false);
  });

  test.each([
    ['no crew at all', null, false, true],
    ['a refused crew name', school, true, true],
    ['nothing to show', school, false, false],
  ] as const)('start another crew unfolds for %s', (_label, current, creating, open) => {
    const view = buildCrewHomeView(input({ current, crews: current ? [current] : [], creating }));
    expect(view.createOpen).toBe(open);
    expect(view.current === null).toBe(current === null);
  });
});
