// The one door to Lucia (v3, deprecated upstream): only this file imports `lucia` or `@lucia-auth/*`, so
// replacing it later touches nothing else. The rest of the app holds an `AppLucia` from here and calls the
// functions below; tests/unit/auth/lucia-boundary.test.ts fails when another file imports it.
import type { AstroCookies } from 'astro';
import type { Kysely } from 'kysely';
import { Lucia, generateIdFromEntropySize, type Cookie } from 'lucia';
import { NodePostgresAdapter } from '@lucia-auth/adapter-postgresql';
import type pg from 'pg';
import { getConfig, isSecureOrigin } from '../config';
import { findMembershipsForUser } from '../crews/crews.repository';
import { getPool } from '../db';
import type { Database } from '../db/database';
import type { CrewMembership, SessionInfo, SessionUser } from './types';

/** The session cookie's name. */
export const SESSION_COOKIE = 'sumpwise_session';

/** A cookie to set on the response: a session's, or the blank one that clears it. */
export type SessionCookie = Cookie;

interface DatabaseUserAttributes {
  email: string;
  display_name: string;
  email_verified_at: Date | null;
  distance_unit: 'mi' | 'km';
  length_unit: 'in' | 'mm';
  temperature_unit: 'F' | 'C';
  time_zone: string | null;
}

interface DatabaseSessionAttributes {
  current_crew_id: string | null;
}

/** A Lucia instance over the users and sessions tables on `pool`; `secure` follows the public URL's scheme. */
export function createLucia(pool: pg.Pool, options: { secure: boolean }) {
  return new Lucia(new NodePostgresAdapter(pool, { user: 'users', session: 'sessions' }), {
    sessionCookie: {
      name: SESSION_COOKIE,
      // Lucia sets HttpOnly and Path=/ itself; SameSite=Lax keeps the cookie off cross-site POSTs.
      attributes: { secure: options.secure, sameSite: 'lax' },
    },
    getUserAttributes: (a): Omit<SessionUser, 'id'> => ({
      email: a.email,
      displayName: a.display_name,
      emailVerified: a.email_verified_at !== null,
      distanceUnit: a.distance_unit,
      lengthUnit: a.length_unit,
      temperatureUnit: a.temperature_unit,
      timeZone: a.time_zone,
    }),
    getSessionAttributes: (a) => ({ currentCrewId: a.current_crew_id }),
  });
}

export type AppLucia = ReturnType<typeof createLucia>;

declare module 'lucia' {
  interface Register {
    Lucia: AppLucia;
    DatabaseUserAttributes: DatabaseUserAttributes;
    DatabaseSessionAttributes: DatabaseSessionAttributes;
  }
}

let lucia: AppLucia | undefined;

/** The app's Lucia instance, on the process's one pool (the same connections Kysely uses). */
export function getLucia(): AppLucia {
  lucia ??= createLucia(getPool(), { secure: isSecureOrigin(getConfig()) });
  return lucia;
}

/** A new user id: 16 random characters, as Lucia's guide recommends for ids. */
export function newUserId(): string {
  return generateIdFromEntropySize(10);
}

export interface LoadedSession {
  user: SessionUser;
  session: SessionInfo;
  crews: CrewMembership[];
  crew: CrewMembership | null;
}

/**
 * True when a request may clear a session cookie that no longer matches a session. Only navigations (and
 * clients that send no Fetch Metadata, such as scripts) may: a page's background fetch that left with the
 * old cookie can come back after a sign-in in the same browser has set the new one, and a blank cookie on
 * that late answer would sign the rider out again (Fetch Metadata, W3C: Sec-Fetch-Mode "navigate").
 */
export function mayClearStaleSessionCookie(headers: Headers): boolean {
  const mode = headers.get('sec-fetch-mode');
  return mode === null || mode === 'navigate';
}

/**
 * Validates the session cookie (refreshing it as Lucia says, clearing a stale one when `clearStale` allows)
 * and resolves the crew the session works in: the one it points at if the user is still a member, else
 * their first crew.
 */
export async function loadSession(
  db: Kysely<Database>,
  lucia: AppLucia,
  cookies: AstroCookies,
  options: { clearStale: boolean } = { clearStale: true },
): Promise<LoadedSession | null> {
  const sessionId = cookies.get(lucia.sessionCookieName)?.value ?? null;
  if (!sessionId) return null;
  const { session, user } = await lucia.validateSession(sessionId);
  if (!session || !user) {
    if (options.clearStale) {
      const blank = lucia.createBlankSessionCookie();
      cookies.set(blank.name, blank.value, blank.attributes);
    }
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
      id: user.id,
      email: user.email,
      displayName: user.displayName,
      emailVerified: user.emailVerified,
      distanceUnit: user.distanceUnit,
      lengthUnit: user.lengthUnit,
      temperatureUnit: user.temperatureUnit,
      timeZone: user.timeZone,
    },
    session: { id: session.id, expiresAt: session.expiresAt, fresh: session.fresh },
    crews,
    crew,
  };
}
