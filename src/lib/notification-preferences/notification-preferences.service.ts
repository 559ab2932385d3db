/** Reading and saving a user's alert preferences, per crew and kind of message. */
import type { Kysely, Transaction } from 'kysely';
import type { Database, NotificationDelivery, NotificationKind, Role } from '../db/database';
import { refuseNotFound, succeed, type Result } from '../http/result';
import { DEFAULT_DELIVERY, NOTIFICATION_KINDS, type PreferenceChoice } from './notification-preferences';
import {
  findDeliveries,
  listUserCrews,
  listUserPreferences,
  upsertPreference,
} from './notification-preferences.repository';

type Db = Kysely<Database> | Transaction<Database>;

export interface CrewPreferences {
  crewId: string;
  crewName: string;
  role: Role;
  choices: Record<NotificationKind, NotificationDelivery>;
}

/** The effective choice of each of the user's crews for each kind (stored, or the kind's default). */
export async function loadUserPreferences(db: Db, userId: string): Promise<CrewPreferences[]> {
  const [crews, stored] = await Promise.all([listUserCrews(db, userId), listUserPreferences(db, userId)]);
  return crews.map((c) => {
    const choices = { ...DEFAULT_DELIVERY };
    for (const s of stored) if (s.crew_id === c.crew_id) choices[s.kind] = s.delivery;
    return { crewId: c.crew_id, crewName: c.crew_name, role: c.role, choices };
  });
}

/** How each user wants this kind of message from this crew. */
export async function resolveDeliveries(
  db: Db,
  crewId: string,
  kind: NotificationKind,
  userIds: readonly string[],
): Promise<Map<string, NotificationDelivery>> {
  const stored = await findDeliveries(db, crewId, kind, userIds);
  return new Map(userIds.map((id) => [id, stored.get(id) ?? DEFAULT_DELIVERY[kind]]));
}

/**
 * Saves the user's choices in one transaction; a choice for a crew the user is not a member of is refused
 * (a forged form must not create rows for other crews) and, like any other crew's record, answers not found.
 */
export async function saveUserPreferences(
  db: Kysely<Database>,
  userId: string,
  choices: readonly PreferenceChoice[],
): Promise<Result<void>> {
  return db.transaction().execute(async (trx) => {
    const crews = new Set((await listUserCrews(trx, userId)).map((c) => c.crew_id));
    if (choices.some((c) => !crews.has(c.crewId))) return refuseNotFound();
    for (const c of choices)
      await upsertPreference(trx, { userId, crewId: c.crewId, kind: c.kind, delivery: c.delivery });
    return succeed(undefined);
  });
}

/** Sets one kind of one crew to off (the unsubscribe link). */
export async function turnOffKind(db: Db, userId: string, crewId: string, kind: NotificationKind): Promise<void> {
  await upsertPreference(db, { userId, crewId, kind, delivery: 'off' });
}

/** Sets every choice that is currently "daily digest" to off, across the user's crews (the digest's unsubscribe link). */
export async function turnOffDigest(db: Db, userId: string): Promise<number> {
  let changed = 0;
  for (const crew of await loadUserPreferences(db, userId)) {
    for (const kind of NOTIFICATION_KINDS) {
      if (crew.choices[kind] !== 'digest') continue;
      await upsertPreference(db, { userId, crewId: crew.crewId, kind, delivery: 'off' });
      changed += 1;
    }
  }
  return changed;
}
