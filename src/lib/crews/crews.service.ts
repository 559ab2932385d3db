import type { Kysely, Transaction } from 'kysely';
import type { Database, Role } from '../db/database';
import { recordAuditEvent } from '../audit/audit.repository';
import { listCrewAuditEvents } from '../audit/audit.repository';
import type { AuditEvent } from '../audit/audit';
import { findUserById, markEmailVerified } from '../auth/auth.repository';
import { canManageCrew } from '../auth/permissions';
import { TOKEN_LIFETIME_MS, generateToken, hashToken } from '../auth/tokens';
import type { Actor, CrewMembership } from '../auth/types';
import { refuse, refuseForbidden, refuseNotFound, succeed, type Result } from '../http/result';
import { isUuid } from '../ids';
import { queueMail } from '../mail/mail.service';
import type { RateLimits } from '../rate-limit/rate-limits';
import {
  deleteMember,
  findInvitationByHash,
  findMembership,
  insertCrew,
  insertInvitation,
  insertMember,
  listMembers,
  listOpenInvitations,
  lockMemberRoles,
  markInvitationAccepted,
  revokeInvitation as revokeInvitationRow,
  revokeOpenInvitationsFor,
  updateMemberRole,
  updateSessionCrew,
} from './crews.repository';
import type { CrewMember, InvitationView, PendingInvitation } from './crews';
import { composeInvitationEmail } from './emails';

type Meta = { ip: string | null };
/** The acting user, named (invitations carry the sender's name), and their membership of the crew in question (null: not a member, answered 404). */
export type CrewActor = Actor<CrewMembership | null> & { displayName: string };

/** Creates a crew led by its creator. */
export async function createCrew(
  db: Kysely<Database>,
  userId: string,
  name: string,
  meta: Meta,
): Promise<{ crewId: string }> {
  return db.transaction().execute(async (trx) => {
    const crewId = await insertCrew(trx, name);
    await insertMember(trx, crewId, userId, 'lead');
    await recordAuditEvent(trx, { kind: 'crew_created', crewId, actorUserId: userId, ip: meta.ip, detail: { name } });
    return { crewId };
  });
}

/** Resolves a crew id from a URL to the user's membership; another crew's id answers exactly like a missing one. */
export async function findCrewForUser(
  db: Kysely<Database>,
  crewId: string,
  userId: string,
): Promise<Result<CrewMembership>> {
  const membership = isUuid(crewId) ? await findMembership(db, crewId, userId) : null;
  return membership ? succeed(membership) : refuseNotFound();
}

/** Everything the crew page shows; invitations and the audit log only to leads. */
export async function loadCrewOverview(
  db: Kysely<Database>,
  m: CrewMembership,
): Promise<{ members: CrewMember[]; invitations: PendingInvitation[]; audit: AuditEvent[] }> {
  const members = await listMembers(db, m.crewId);
  if (!canManageCrew(m)) return { members, invitations: [], audit: [] };
  const [invitations, audit] = await Promise.all([
    listOpenInvitations(db, m.crewId),
    listCrewAuditEvents(db, m.crewId, 100),
  ]);
  return { members, invitations, audit };
}

/** A lead invites an address with a role; the link goes out by e-mail. Returns the token for tests only. */
export async function inviteMember(
  deps: { db: Kysely<Database>; limits: RateLimits; publicUrl: string },
  actor: CrewActor,
  input: { email: string; role: Role },
  meta: Meta,
): Promise<Result<{ invitationId: string; token: string }>> {
  if (!actor.membership) return refuseNotFound();
  if (!canManageCrew(actor.membership)) return refuseForbidden('Only a lead of this crew can invite people.');
  const crew = actor.membership;
  // An invitation carries text the inviter wrote (crew and display names) to someone else's inbox: only an
  // address proven to be the inviter's may send it, so a throw-away account cannot send mail in our name.
  const inviter = await findUserById(deps.db, actor.userId);
  if (!inviter?.email_verified_at) {
    return refuse(
      403,
      'email_not_verified',
      'Confirm your e-mail address before inviting anyone: open the link we sent you, or ask for a new one on your account page.',
    );
  }
  for (const [name, key] of [
    ['inviteUser', actor.userId],
    ['inviteCrew', crew.crewId],
  ] as const) {
    const limit = await deps.limits.consume(name, key);
    if (!limit.allowed) {
      const which =
        name === 'inviteCrew'
          ? 'This crew has sent as many invitations as it may in one day'
          : 'You have sent as many invitations as you may in one hour';
      return refuse(
        429,
        'rate_limited',
        `${which}. Try again in ${Math.ceil(limit.retryAfterSeconds / 60)} minute(s).`,
        {},
        { retryAfterSeconds: limit.retryAfterSeconds },
      );
    }
  }
  const members = await listMembers(deps.db, crew.crewId);
  if (members.some((m) => m.email.toLowerCase() === input.email)) {
    return refuse(409, 'already_member', 'That person is already in this crew.', {
      email: 'Already a member of this crew.',
    });
  }
  const token = generateToken();
  const invitationId = await deps.db.transaction().execute(async (trx) => {
    await revokeOpenInvitationsFor(trx, crew.crewId, input.email);
    const id = await insertInvitation(trx, {
      crewId: crew.crewId,
      email: input.email,
      role: input.role,
      tokenHash: hashToken(token),
      invitedBy: actor.userId,
      expiresAt: new Date(Date.now() + TOKEN_LIFETIME_MS.invitation),
    });
    const mail = composeInvitationEmail({
      crewName: crew.crewName,
      inviterName: actor.displayName,
      role: input.role,
      url: new URL(`/invitations/${token}`, deps.publicUrl).toString(),
      validDays: TOKEN_LIFETIME_MS.invitation / 86_400_000,
    });
    await queueMail(trx, {
      to: input.email,
      ...mail,
      idempotencyKey: `crew_invitation:${id}`,
      kind: 'crew_invitation',
    });
    await recordAuditEvent(trx, {
      kind: 'invitation_sent',
      crewId: crew.crewId,
      actorUserId: actor.userId,
      ip: meta.ip,
      detail: { email: input.email, role: input.role },
    });
    return id;
  });
  return succeed({ invitationId, token });
}

/** What an invitation link shows before it is accepted; null for a token that never existed. */
export async function describeInvitation(db: Kysely<Database>, token: string): Promise<InvitationView | null> {
  const row = await findInvitationByHash(db, hashToken(token));
  if (!row || row.revokedAt) return null;
  const state = row.acceptedAt ? 'used' : row.expiresAt <= new Date() ? 'expired' : 'open';
  return { id: row.id, crewId: row.crewId, crewName: row.crewName, email: row.email, role: row.role, state };
}

/** Joins a crew by invitation inside the caller's transaction (sign-up uses it too). */
export async function acceptInvitationInTransaction(
  trx: Transaction<Database>,
  token: string,
  user: { id: string; email: string },
  meta: Meta,
): Promise<Result<{ crewId: string; role: Role }>> {
  const row = await findInvitationByHash(trx, hashToken(token));
  if (!row || row.revokedAt)
    return refuse(404, 'invalid_invitation', 'This invitation does not exist or was withdrawn.');
  if (row.acceptedAt) return refuse(410, 'used_invitation', 'This invitation has already been used.');
  if (row.expiresAt <= new Date())
    return refuse(410, 'expired_invitation', 'This invitation has expired. Ask the crew’s lead for a new one.');
  if (row.email.toLowerCase() !== user.email.toLowerCase()) {
    return refuse(
      403,
      'wrong_address',
      `This invitation was sent to another e-mail address. Sign in with that address, or ask the lead to invite ${user.email}.`,
      { email: 'This invitation is for another address.' },
    );
  }
  // Only one acceptance wins when two tabs race: the update checks the row is still open.
  if (!(await markInvitationAccepted(trx, row.id, user.id)))
    return refuse(410, 'used_invitation', 'This invitation has already been used.');
  await insertMember(trx, row.crewId, user.id, row.role);
  // The link arrived at that address, which proves the address as well as a verification link would.
  await markEmailVerified(trx, user.id);
  await recordAuditEvent(trx, {
    kind: 'invitation_accepted',
    crewId: row.crewId,
    actorUserId: user.id,
    subjectUserId: user.id,
    ip: meta.ip,
    detail: { role: row.role },
  });
  return succeed({ crewId: row.crewId, role: row.role });
}

/** A signed-in user accepts an invitation; their session then works in that crew. The role comes from the invitation only. */
export async function acceptInvitation(
  db: Kysely<Database>,
  token: string,
  user: { id: string; email: string },
  sessionId: string | null,
  meta: Meta,
): Promise<Result<{ crewId: string; role: Role }>> {
  return db.transaction().execute(async (trx) => {
    const result = await acceptInvitationInTransaction(trx, token, user, meta);
    if (result.ok && sessionId) await updateSessionCrew(trx, sessionId, result.value.crewId);
    return result;
  });
}

function leadCount(roles: Map<string, Role>): number {
  return [...roles.values()].filter((r) => r === 'lead').length;
}

const LAST_LEAD = () => refuse(409, 'last_lead', 'A crew needs at least one lead. Make someone else lead first.');

/** A lead changes a member's role; the last lead cannot be demoted. */
export async function changeMemberRole(
  db: Kysely<Database>,
  actor: CrewActor,
  targetUserId: string,
  role: Role,
  meta: Meta,
): Promise<Result<void>> {
  if (!actor.membership) return refuseNotFound();
  if (!canManageCrew(actor.membership)) return refuseForbidden('Only a lead of this crew can change roles.');
  const crewId = actor.membership.crewId;
  return db.transaction().execute(async (trx) => {
    const roles = await lockMemberRoles(trx, crewId);
    const from = roles.get(targetUserId);
    if (!from) return refuseNotFound();
    if (from === role) return succeed(undefined);
    if (from === 'lead' && leadCount(roles) === 1) return LAST_LEAD();
    await updateMemberRole(trx, crewId, targetUserId, role);
    await recordAuditEvent(trx, {
      kind: 'role_changed',
      crewId,
      actorUserId: actor.userId,
      subjectUserId: targetUserId,
      ip: meta.ip,
      detail: { from, to: role },
    });
    return succeed(undefined);
  });
}

/** A lead removes a member, or a member leaves (target = self); the last lead can do neither. */
export async function removeMember(
  db: Kysely<Database>,
  actor: CrewActor,
  targetUserId: string,
  meta: Meta,
): Promise<Result<void>> {
  if (!actor.membership) return refuseNotFound();
  const leaving = targetUserId === actor.userId;
  if (!leaving && !canManageCrew(actor.membership))
    return refuseForbidden('Only a lead of this crew can remove members.');
  const crewId = actor.membership.crewId;
  return db.transaction().execute(async (trx) => {
    const roles = await lockMemberRoles(trx, crewId);
    const role = roles.get(targetUserId);
    if (!role) return refuseNotFound();
    if (role === 'lead' && leadCount(roles) === 1) return LAST_LEAD();
    await deleteMember(trx, crewId, targetUserId);
    await recordAuditEvent(trx, {
      kind: leaving ? 'member_left' : 'member_removed',
      crewId,
      actorUserId: actor.userId,
      subjectUserId: targetUserId,
      ip: meta.ip,
      detail: { role },
    });
    return succeed(undefined);
  });
}

/** A lead withdraws an open invitation. */
export async function withdrawInvitation(
  db: Kysely<Database>,
  actor: CrewActor,
  invitationId: string,
  meta: Meta,
): Promise<Result<void>> {
  if (!actor.membership) return refuseNotFound();
  if (!canManageCrew(actor.membership)) return refuseForbidden('Only a lead of this crew can withdraw invitations.');
  if (!isUuid(invitationId)) return refuseNotFound();
  const crewId = actor.membership.crewId;
  return db.transaction().execute(async (trx) => {
    const row = await revokeInvitationRow(trx, crewId, invitationId);
    if (!row) return refuseNotFound();
    await recordAuditEvent(trx, {
      kind: 'invitation_revoked',
      crewId,
      actorUserId: actor.userId,
      ip: meta.ip,
      detail: { email: row.email },
    });
    return succeed(undefined);
  });
}

/** Points the session at another of the user's crews; a crew they are not in answers not found. */
export async function switchCrew(
  db: Kysely<Database>,
  sessionId: string,
  userId: string,
  crewId: string,
): Promise<Result<{ crew: CrewMembership }>> {
  const found = await findCrewForUser(db, crewId, userId);
  if (!found.ok) return found;
  await updateSessionCrew(db, sessionId, crewId);
  return succeed({ crew: found.value });
}
