import { describe, expect, test } from 'vitest';
import type { AuditEvent } from '~/lib/audit/audit';
import { buildCrewPageView, describeAuditDetail, describeAuditWho } from '~/lib/crews/crew-page-view';

const ada = {
  userId: 'u1',
  displayName: 'Ada',
  email: 'ada@example.test',
  role: 'lead' as const,
  joinedAt: new Date('2026-01-01T00:00:00Z'),
};
const ben = {
  userId: 'u2',
  displayName: 'Ben',
  email: 'ben@example.test',
  role: 'rider' as const,
  joinedAt: new Date('2026-01-02T00:00:00Z'),
};

describe('crew page words', () => {
  // Invitation and audit times follow the viewer's zone (the formatter's own cases are in words/dates.test.ts).
  test.each([
    [undefined, 'until 4 Mar 2026, 05:06', '4 Mar 2026, 05:06'],
    ['Europe/Paris', 'until 4 Mar 2026, 06:06', '4 Mar 2026, 06:06'],
  ])('times in zone %s', (timeZone, until, when) => {
    const at = new Date('2026-03-04T05:06:07Z');
    const view = buildCrewPageView({
      userId: 'u1',
      role: 'lead',
      lead: true,
      members: [],
      invitations: [{ id: 'i1', email: 'c@example.test', role: 'rider', expiresAt: at, createdAt: at }],
      audit: [{ id: 1, kind: 'crew_created', at, actorName: 'Ada', subjectName: null, detail: {}, ip: null }],
      timeZone,
    });
    expect(view.invitations[0]!.text).toContain(until);
    expect(view.audit[0]!.when).toBe(when);
  });

  test.each([
    [{ actorName: 'Ada', subjectName: 'Ben' }, 'Ada → Ben'],
    [{ actorName: 'Ada', subjectName: 'Ada' }, 'Ada'],
    [{ actorName: 'Ada', subjectName: null }, 'Ada'],
    [{ actorName: null, subjectName: 'Ben' }, 'Ben'],
    [{ actorName: null, subjectName: null }, '—'],
  ])('%o → %s', (e, who) => expect(describeAuditWho(e)).toBe(who));

  test.each([
    [{}, ''],
    [{ role: 'rider' }, 'role: rider'],
    [{ from: 'rider', to: 'mechanic', n: 2 }, 'from: rider, to: mechanic, n: 2'],
  ])('detail %o → "%s"', (detail, text) => expect(describeAuditDetail(detail)).toBe(text));
});

describe('the crew page model', () => {
  test('a lead sees every member with a role choice, leaves as themselves, and reads the log', () => {
    const audit: AuditEvent[] = [
      {
        id: 1,
        kind: 'sign_in',
        at: new Date('2026-03-04T05:06:07Z'),
        actorName: 'Ada',
        subjectName: null,
        detail: {},
        ip: null,
      },
    ];
    const invitations = [
      {
        id: 'i1',
        email: 'cy@example.test',
        role: 'mechanic' as const,
        expiresAt: new Date('2026-03-11T08:00:00Z'),
        createdAt: new Date(),
      },
    ];
    const v = buildCrewPageView({ userId: 'u1', role: 'lead', lead: true, members: [ada, ben], invitations, audit });
    expect(v).toMatchObject({ roleWord: 'lead', lead: true });
    expect(
      v.members.map((m) => [
        m.label,
        m.roleLabel,
        m.removeLabel,
        m.roles.filter((r) => r.selected).map((r) => r.value),
      ]),
    ).toEqual([
      ['Ada (you)', 'Lead', 'Leave crew', ['lead']],
      ['Ben', 'Rider', 'Remove', ['rider']],
    ]);
    expect(v.invitations).toEqual([{ id: 'i1', text: 'cy@example.test · Mechanic · until 11 Mar 2026, 08:00' }]);
    expect(v.audit).toEqual([{ when: '4 Mar 2026, 05:06', event: 'Signed in', who: 'Ada', detail: '' }]);
  });

  test('a rider sees the members and nothing of a lead', () => {
    const v = buildCrewPageView({
      userId: 'u2',
      role: 'rider',
      lead: false,
      members: [ada, ben],
      invitations: [],
      audit: [],
    });
    expect(v).toMatchObject({ roleWord: 'rider', lead: false, invitations: [], audit: [] });
    expect(v.members.map((m) => m.label)).toEqual(['Ada', 'Ben (you)']);
  });
});
