import { describe, expect, test } from 'vitest';
import type { AuditEvent } from '~/lib/audit/audit';
import { buildCrewPageView, describeAuditDetail, describeAuditWho } from '~/lib/crews/crew-page-view';
import { formatUtcMinute } from '~/lib/words/words';

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
  // ISO 8601 date and time to the minute, with a space for the T (common practice on screens).
  test.each([
    ['2026-03-04T05:06:07Z', '2026-03-04 05:06'],
    ['2026-03-04T07:06:07+02:00', '2026-03-04 05:06'],
    ['2026-12-31T23:59:59.999Z', '2026-12-31 23:59'],
  ])('%s shows as %s', (iso, text) => expect(formatUtcMinute(new Date(iso))).toBe(text));

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
    expect(v.invitations).toEqual([{ id: 'i1', text: 'cy@example.test · Mechanic · until 2026-03-11 08:00 UTC' }]);
    expect(v.audit).toEqual([{ when: '2026-03-04 05:06', event: 'Signed in', who: 'Ada', detail: '' }]);
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
