import type { AstroCookies } from 'astro';
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { findMembershipsForUser } from '../crews/crews.repository';
import type { AppLucia } from './lucia';
import type { CrewMembership, SessionInfo, SessionUser } from './types';

export interface LoadedSession {
  user: SessionUser;
  session: SessionInfo;
  crews: CrewMembership[];
  crew: CrewMembership | null;
}

/**
 * Validates the session cookie (refreshing or clearing it as Lucia says) and resolves the crew the
 * session works in: the one it points at if the user is still a member, else their first crew.
 */
export async function loadSession(db: Kysely<Database>, lucia: AppLucia, cookies: AstroCookies): Promise<LoadedSession | null> {
  const sessionId = cookies.get(lucia.sessionCookieName)?.value ?? null;
  if (!sessionId) return null;
  const { session, user } = await lucia.validateSession(sessionId);
  if (!session || !user) {
    const blank = lucia.createBlankSessionCookie();
    cookies.set(blank.name, blank.value, blank.attributes);
    return null;
  }
  if (session.fresh) {
    const cookie = lucia.createSessionCookie(session.id);
    cookies.set(cookie.name, cookie.value, cookie.attributes);
  }
  const crews = await findMembershipsForUser(db, user.id);
  const crew = crews.find((c) => c.crewId === session.currentCrewId) ?? crews[0] ?? null;
  return {
    user: {
      id: user.id, email: user.email, displayName: user.displayName, emailVerified: user.emailVerified,
      distanceUnit: user.distanceUnit, lengthUnit: user.lengthUnit, temperatureUnit: user.temperatureUnit,
    },
    session: { id: session.id, expiresAt: session.expiresAt, fresh: session.fresh },
    crews,
    crew,
  };
}
