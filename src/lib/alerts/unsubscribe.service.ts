/** The unsubscribe link: read what a token stops, and stop it. Works without signing in; the signature is the proof. */
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { turnOffDigest, turnOffKind } from '../notification-preferences/notification-preferences.service';
import { findCrewName } from './alerts.repository';
import { isCrewMember, userExists } from './unsubscribe.repository';
import { describeUnsubscribeScope } from './alerts';
import { verifyUnsubscribeToken, type UnsubscribeScope } from './unsubscribe-token';

export type UnsubscribeLookup = { ok: true; scope: UnsubscribeScope; what: string } | { ok: false };

/** What a token would stop, in words; not ok for a forged or altered token, or a user or crew that no longer exists. */
export async function describeUnsubscribeToken(
  db: Kysely<Database>,
  token: string,
  secret: string,
): Promise<UnsubscribeLookup> {
  const scope = verifyUnsubscribeToken(token, secret);
  if (!scope) return { ok: false };
  if (!(await userExists(db, scope.userId))) return { ok: false };
  if (scope.crewId === null) return { ok: true, scope, what: describeUnsubscribeScope('digest', null) };
  const crewName = await findCrewName(db, scope.crewId);
  if (crewName === null) return { ok: false };
  return { ok: true, scope, what: describeUnsubscribeScope(scope.kind, crewName) };
}

/**
 * Stops what the token names (that kind from that crew set to off, or every digest choice set to off) and
 * nothing else. Repeating it is harmless. A user who has left the crew gets none of its mail anyway, so
 * nothing is written for them.
 */
export async function applyUnsubscribe(
  db: Kysely<Database>,
  token: string,
  secret: string,
): Promise<UnsubscribeLookup> {
  const found = await describeUnsubscribeToken(db, token, secret);
  if (!found.ok) return found;
  const { scope } = found;
  await db.transaction().execute(async (trx) => {
    if (scope.crewId === null) {
      await turnOffDigest(trx, scope.userId);
      return;
    }
    if (await isCrewMember(trx, scope.crewId, scope.userId))
      await turnOffKind(trx, scope.userId, scope.crewId, scope.kind);
  });
  return found;
}
