// The one door to Lucia (v3, deprecated upstream): only this file imports `lucia` or `@lucia-auth/*`, so
// replacing it later touches nothing else. The rest of the app holds an `AppLucia` from here and calls the
// functions below; tests/unit/auth/lucia-boundary.test.ts fails when another file imports it.
import type { AstroCookies } from 'astro';
import { Lucia, generateIdFromEntropySize, type Cookie, type DatabaseSession, type DatabaseUser } from 'lucia';
import { NodePostgresAdapter } from '@lucia-auth/adapter-postgresql';
import type pg from 'pg';
import { getConfig, isSecureOrigin } from '../config';
import { getPool } from '../db';
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
  /** The user's crews, oldest membership first: read with the session (OneQuerySessionAdapter). */
  crews: CrewMembership[];
}

interface DatabaseSessionAttributes {
  current_crew_id: string | null;
}

/** One row of OneQuerySessionAdapter's query: the session's columns, then its user's and their crews. */
type SessionAndUserRow = { id: string; user_id: string; expires_at: Date } & DatabaseSessionAttributes &
  DatabaseUserAttributes;

/**
 * Lucia's PostgreSQL adapter, with the session, its user and the user's crews read in one query. The stock adapter
 * reads the session and the user in two queries at once (two pooled connections), and the crews came in a third;
 * every signed-in request makes this call. Writes stay the stock adapter's.
 */
class OneQuerySessionAdapter extends NodePostgresAdapter {
  readonly #pool: pg.Pool;

  constructor(pool: pg.Pool) {
    super(pool, { user: 'users', session: 'sessions' });
    this.#pool = pool;
  }

  override async getSessionAndUser(sessionId: string): Promise<[DatabaseSession | null, DatabaseUser | null]> {
    const { rows } = await this.#pool.query<SessionAndUserRow>(
      `select s.id, s.user_id, s.expires_at, s.current_crew_id,
              u.email, u.display_name, u.email_verified_at, u.distance_unit, u.length_unit, u.temperature_unit,
              u.time_zone,
              (select coalesce(json_agg(json_build_object('crewId', m.crew_id, 'crewName', c.name, 'role', m.role)
                                        order by m.joined_at, c.name), '[]')
                 from crew_members m join crews c on c.id = m.crew_id
                where m.user_id = u.id) as crews
         from sessions s join users u on u.id = s.user_id
        where s.id = $1`,
      [sessionId],
    );
    const row = rows[0];
    if (!row) return [null, null];
    const { id, user_id, expires_at, current_crew_id, ...user } = row;
    return [
      { id, userId: user_id, expiresAt: expires_at, attributes: { current_crew_id } },
      { id: user_id, attributes: user },
    ];
  }
}

/** A Lucia instance over the users and sessions tables on `pool`; `secure` follows the public URL's scheme. */
export function createLucia(pool: pg.Pool, options: { secure: boolean }) {
  return new Lucia(new OneQuerySessionAdapter(pool), {
    sessionCookie: {
      name: SESSION_COOKIE,
      // Lucia sets HttpOnly and Path=/ itself; SameSite=Lax keeps the cookie off cross-site POSTs.
      attributes: { secure: options.secure, sameSite: 'lax' },
    },
    getUserAttributes: (a): Omit<SessionUser, 'id'> & { crews: CrewMembership[] } => ({
      email: a.email,
      displayName: a.display_name,
      emailVerified: a.email_verified_at !== null,
      distanceUnit: a.distance_unit,
      lengthUnit: a.length_unit,
      temperatureUnit: a.temperature_unit,
      timeZone: a.time_zone,
      crews: a.crews,
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
 * their first crew. One query (OneQuerySessionAdapter), plus Lucia's write when it extends the session.
 */
export async function loadSession(
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
  const crews = user.crews;
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
