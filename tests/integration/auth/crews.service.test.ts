import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type pg from 'pg';
import type { Role } from '~/lib/db/database';
import { openTestDb, truncateAll } from '../test-database';
import { addMember, makeCrew, makeUser } from '../factories';
import { firstLink, makeAuthDeps, outboxFor } from './auth-test-deps';
import { signIn, signUp, type AuthDeps } from '~/lib/auth/auth.service';
import {
  acceptInvitation,
  changeMemberRole,
  createCrew,
  describeInvitation,
  inviteMember,
  loadCrewOverview,
  removeMember,
  switchCrew,
  withdrawInvitation,
  type CrewActor,
} from '~/lib/crews/crews.service';
import { findMembership, findMembershipsForUser } from '~/lib/crews/crews.repository';
import { listCrewAuditEvents } from '~/lib/audit/audit.repository';

const db = openTestDb();
const { deps, pool }: { deps: AuthDeps; pool: pg.Pool } = makeAuthDeps(db);
afterAll(async () => {
  await pool.end();
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});
const meta = { ip: '192.0.2.20' }; // RFC 5737 documentation address

/** A crew with one member of each role. */
async function school() {
  const crew = await makeCrew(db, 'Larchwood test crew');
  const people = {} as Record<Role, { id: string; email: string }>;
  for (const role of ['lead', 'mechanic', 'rider'] as const) {
    people[role] = await makeUser(db, { email: `${role}@example.test`, displayName: role });
    await addMember(db, crew.id, people[role].id, role);
  }
  const actor = async (role: Role): Promise<CrewActor> => ({
    userId: people[role].id,
    displayName: role,
    membership: await findMembership(db, crew.id, people[role].id),
  });
  return { crew, people, actor };
}

describe('invitations', () => {
  test.each([
    ['mechanic', 403, 'forbidden'],
    ['rider', 403, 'forbidden'],
  ] as const)('a %s cannot invite (%i)', async (role, status, code) => {
    const s = await school();
    expect(
      await inviteMember(deps, await s.actor(role), { email: 'new@example.test', role: 'rider' }, meta),
    ).toMatchObject({ ok: false, status, code });
  });

  test('a lead of another crew gets not-found, not forbidden', async () => {
    const s = await school();
    const outsider = await makeUser(db);
    const actor: CrewActor = {
      userId: outsider.id,
      displayName: 'x',
      membership: await findMembership(db, s.crew.id, outsider.id),
    };
    expect(await inviteMember(deps, actor, { email: 'new@example.test', role: 'rider' }, meta)).toMatchObject({
      ok: false,
      status: 404,
    });
  });

  test('a lead invites; the mail links to the invitation; the invited address accepts with the invited role, once', async () => {
    const s = await school();
    const inv = await inviteMember(deps, await s.actor('lead'), { email: 'wren@example.test', role: 'mechanic' }, meta);
    if (!inv.ok) throw new Error(inv.code);
    const [mail] = await outboxFor(db, 'wren@example.test');
    expect(mail?.kind).toBe('crew_invitation');
    expect(firstLink(mail!.text_body)).toBe(`http://127.0.0.1:4321/invitations/${inv.value.token}`);
    expect(await describeInvitation(db, inv.value.token)).toMatchObject({
      crewName: 'Larchwood test crew',
      role: 'mechanic',
      state: 'open',
    });

    const wren = await makeUser(db, { email: 'wren@example.test' });
    expect(await acceptInvitation(db, inv.value.token, wren, null, meta)).toEqual({
      ok: true,
      value: { crewId: s.crew.id, role: 'mechanic' },
    });
    expect((await findMembership(db, s.crew.id, wren.id))?.role).toBe('mechanic');
    expect(await acceptInvitation(db, inv.value.token, wren, null, meta)).toMatchObject({
      ok: false,
      code: 'used_invitation',
    });
    expect((await describeInvitation(db, inv.value.token))?.state).toBe('used');
  });

  test('an invitation for another address is refused and joins nobody', async () => {
    const s = await school();
    const inv = await inviteMember(deps, await s.actor('lead'), { email: 'wren@example.test', role: 'lead' }, meta);
    if (!inv.ok) throw new Error(inv.code);
    const other = await makeUser(db, { email: 'someone-else@example.test' });
    expect(await acceptInvitation(db, inv.value.token, other, null, meta)).toMatchObject({
      ok: false,
      status: 403,
      code: 'wrong_address',
    });
    expect(await findMembership(db, s.crew.id, other.id)).toBeNull();
  });

  test('an expired or withdrawn invitation is refused', async () => {
    const s = await school();
    const lead = await s.actor('lead');
    const a = await inviteMember(deps, lead, { email: 'a@example.test', role: 'rider' }, meta);
    const b = await inviteMember(deps, lead, { email: 'b@example.test', role: 'rider' }, meta);
    if (!a.ok || !b.ok) throw new Error('invite failed');
    await db
      .updateTable('crew_invitations')
      .set({ expires_at: new Date(Date.now() - 1) })
      .where('id', '=', a.value.invitationId)
      .execute();
    expect(await withdrawInvitation(db, lead, b.value.invitationId, meta)).toEqual({ ok: true });
    expect(
      await acceptInvitation(db, a.value.token, await makeUser(db, { email: 'a@example.test' }), null, meta),
    ).toMatchObject({ code: 'expired_invitation' });
    expect(
      await acceptInvitation(db, b.value.token, await makeUser(db, { email: 'b@example.test' }), null, meta),
    ).toMatchObject({ code: 'invalid_invitation' });
  });

  test('a new person signs up through the invitation: own crew plus the invited crew, address verified, working in the invited crew', async () => {
    const s = await school();
    const inv = await inviteMember(deps, await s.actor('lead'), { email: 'finch@example.test', role: 'rider' }, meta);
    if (!inv.ok) throw new Error(inv.code);
    const r = await signUp(
      deps,
      { email: 'finch@example.test', password: 'a long enough password', invitation: inv.value.token },
      meta,
    );
    if (!r.ok) throw new Error(r.code);
    expect(r.value.crewId).toBe(s.crew.id);
    expect((await findMembershipsForUser(db, r.value.userId)).map((m) => m.role).sort()).toEqual(['lead', 'rider']);
    const user = await db
      .selectFrom('users')
      .select('email_verified_at')
      .where('id', '=', r.value.userId)
      .executeTakeFirstOrThrow();
    expect(user.email_verified_at).not.toBeNull();
  });

  test('signing up through an invitation with a different address writes nothing', async () => {
    const s = await school();
    const inv = await inviteMember(deps, await s.actor('lead'), { email: 'finch@example.test', role: 'rider' }, meta);
    if (!inv.ok) throw new Error(inv.code);
    const r = await signUp(
      deps,
      { email: 'intruder@example.test', password: 'a long enough password', invitation: inv.value.token },
      meta,
    );
    expect(r).toMatchObject({ ok: false, code: 'wrong_address' });
    expect(
      await db.selectFrom('users').select('id').where('email', '=', 'intruder@example.test').executeTakeFirst(),
    ).toBeUndefined();
  });
});

describe('roles and membership', () => {
  test('a lead changes a role; a rider cannot', async () => {
    const s = await school();
    expect(await changeMemberRole(db, await s.actor('rider'), s.people.mechanic.id, 'lead', meta)).toMatchObject({
      status: 403,
    });
    expect(await changeMemberRole(db, await s.actor('lead'), s.people.rider.id, 'mechanic', meta)).toEqual({
      ok: true,
    });
    expect((await findMembership(db, s.crew.id, s.people.rider.id))?.role).toBe('mechanic');
  });

  test('the last lead can neither be demoted nor leave; with a second lead both work', async () => {
    const s = await school();
    const lead = await s.actor('lead');
    expect(await changeMemberRole(db, lead, s.people.lead.id, 'rider', meta)).toMatchObject({
      ok: false,
      code: 'last_lead',
    });
    expect(await removeMember(db, lead, s.people.lead.id, meta)).toMatchObject({ ok: false, code: 'last_lead' });
    expect(await changeMemberRole(db, lead, s.people.mechanic.id, 'lead', meta)).toEqual({ ok: true });
    expect(await changeMemberRole(db, lead, s.people.lead.id, 'rider', meta)).toEqual({ ok: true });
    expect((await findMembership(db, s.crew.id, s.people.lead.id))?.role).toBe('rider');
  });

  test('a lead removes a member; a rider may leave but not remove others', async () => {
    const s = await school();
    expect(await removeMember(db, await s.actor('rider'), s.people.mechanic.id, meta)).toMatchObject({ status: 403 });
    expect(await removeMember(db, await s.actor('rider'), s.people.rider.id, meta)).toEqual({ ok: true });
    expect(await removeMember(db, await s.actor('lead'), s.people.mechanic.id, meta)).toEqual({ ok: true });
    expect((await loadCrewOverview(db, (await s.actor('lead')).membership!)).members.map((m) => m.role)).toEqual([
      'lead',
    ]);
  });

  test('switching to a crew one is not in answers not found; to one’s own works', async () => {
    const s = await school();
    const r = await signUp(deps, { email: 'solo@example.test', password: 'a long enough password' }, meta);
    if (!r.ok) throw new Error(r.code);
    expect(await switchCrew(db, r.value.cookie.value, r.value.userId, s.crew.id)).toMatchObject({
      ok: false,
      status: 404,
    });
    const extra = await createCrew(db, r.value.userId, 'Second garage', meta);
    expect(await switchCrew(db, r.value.cookie.value, r.value.userId, extra.crewId)).toMatchObject({
      ok: true,
      value: { crew: { role: 'lead' } },
    });
    expect((await deps.lucia.validateSession(r.value.cookie.value)).session?.currentCrewId).toBe(extra.crewId);
  });
});

describe('audit log', () => {
  test('leads see their crew’s events and their members’ sign-ins since joining, nothing of other crews', async () => {
    const s = await school();
    const inv = await inviteMember(deps, await s.actor('lead'), { email: 'wren@example.test', role: 'rider' }, meta);
    if (!inv.ok) throw new Error(inv.code);
    const wren = await signUp(
      deps,
      { email: 'wren@example.test', password: 'a long enough password', invitation: inv.value.token },
      meta,
    );
    if (!wren.ok) throw new Error(wren.code);
    await changeMemberRole(db, await s.actor('lead'), wren.value.userId, 'mechanic', meta);
    await signIn(deps, { email: 'wren@example.test', password: 'a long enough password' }, meta);
    await signUp(deps, { email: 'outsider@example.test', password: 'a long enough password' }, meta);
    await signIn(deps, { email: 'outsider@example.test', password: 'a long enough password' }, meta);

    const kinds = (await listCrewAuditEvents(db, s.crew.id)).map((e) => e.kind).reverse();
    expect(kinds).toEqual(['invitation_sent', 'invitation_accepted', 'role_changed', 'sign_in']);
    const overview = await loadCrewOverview(db, (await s.actor('rider')).membership!);
    expect(overview.audit).toEqual([]); // riders do not see the log
  });
});
