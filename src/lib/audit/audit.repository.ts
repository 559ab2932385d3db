import { sql, type Kysely, type Transaction } from 'kysely';
import type { Database } from '../db/database';
import type { AuditEvent, AuditEventInput, AuditKind } from './audit';

type Db = Kysely<Database> | Transaction<Database>;

// Account events (sign-in, password change) carry no crew: a crew's leads see those of their current
// members from the day each joined, so nothing from before someone joined leaks into a crew's view.
const ACCOUNT_KINDS: AuditKind[] = [
  'sign_in',
  'sign_in_failed',
  'sign_out',
  'password_changed',
  'password_reset',
  'email_verified',
];

/** Appends one event to the audit log. */
export async function recordAuditEvent(db: Db, e: AuditEventInput): Promise<void> {
  await db
    .insertInto('audit_events')
    .values({
      kind: e.kind,
      crew_id: e.crewId ?? null,
      actor_user_id: e.actorUserId ?? null,
      subject_user_id: e.subjectUserId ?? null,
      detail: JSON.stringify(e.detail ?? {}),
      ip: e.ip ?? null,
    })
    .execute();
}

/** A crew's security events, newest first: the crew's own events and its members' account events. */
export async function listCrewAuditEvents(db: Db, crewId: string, limit = 100): Promise<AuditEvent[]> {
  const rows = await db
    .selectFrom('audit_events as e')
    .leftJoin('users as actor', 'actor.id', 'e.actor_user_id')
    .leftJoin('users as subject', 'subject.id', 'e.subject_user_id')
    .select([
      'e.id',
      'e.kind',
      'e.at',
      'e.detail',
      'e.ip',
      'actor.display_name as actorName',
      'subject.display_name as subjectName',
    ])
    .where((eb) =>
      eb.or([
        eb('e.crew_id', '=', crewId),
        eb.and([
          eb('e.crew_id', 'is', null),
          eb('e.kind', 'in', ACCOUNT_KINDS),
          eb.exists(
            eb
              .selectFrom('crew_members as m')
              .select(sql`1`.as('one'))
              .whereRef('m.user_id', '=', 'e.subject_user_id')
              .where('m.crew_id', '=', crewId)
              .whereRef('m.joined_at', '<=', 'e.at'),
          ),
        ]),
      ]),
    )
    .orderBy('e.at', 'desc')
    .orderBy('e.id', 'desc')
    .limit(limit)
    .execute();
  return rows.map((r) => ({
    id: r.id,
    kind: r.kind as AuditKind,
    at: r.at,
    actorName: r.actorName,
    subjectName: r.subjectName,
    detail: r.detail,
    ip: r.ip,
  }));
}

/** One user's own account events, newest first (shown on their account page). */
export async function listUserAuditEvents(db: Db, userId: string, limit = 20): Promise<AuditEvent[]> {
  const rows = await db
    .selectFrom('audit_events as e')
    .leftJoin('users as actor', 'actor.id', 'e.actor_user_id')
    .leftJoin('users as subject', 'subject.id', 'e.subject_user_id')
    .select([
      'e.id',
      'e.kind',
      'e.at',
      'e.detail',
      'e.ip',
      'actor.display_name as actorName',
      'subject.display_name as subjectName',
    ])
    .where('e.subject_user_id', '=', userId)
    .where('e.kind', 'in', ACCOUNT_KINDS)
    .orderBy('e.at', 'desc')
    .orderBy('e.id', 'desc')
    .limit(limit)
    .execute();
  return rows.map((r) => ({
    id: r.id,
    kind: r.kind as AuditKind,
    at: r.at,
    actorName: r.actorName,
    subjectName: r.subjectName,
    detail: r.detail,
    ip: r.ip,
  }));
}
