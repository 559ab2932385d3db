import { Lucia } from 'lucia';
import { NodePostgresAdapter } from '@lucia-auth/adapter-postgresql';
import pg from 'pg';
import { getConfig, isSecureOrigin } from '../config';
import { getPool } from '../db';
import type { SessionUser } from './types';

/** The session cookie's name. */
export const SESSION_COOKIE = 'sumpwise_session';

interface DatabaseUserAttributes {
  email: string;
  display_name: string;
  email_verified_at: Date | null;
  distance_unit: 'mi' | 'km';
  length_unit: 'in' | 'mm';
  temperature_unit: 'F' | 'C';
}

interface DatabaseSessionAttributes {
  current_crew_id: string | null;
}

/** A Lucia instance over the users and sessions tables; `secure` follows the public URL's scheme. */
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

/** The pg pool behind Lucia and the rate limiter (they need a pg client, not Kysely): the app's one pool. */
export function getAuthPool(): pg.Pool {
  return getPool();
}

/** The app's Lucia instance. */
export function getLucia(): AppLucia {
  lucia ??= createLucia(getAuthPool(), { secure: isSecureOrigin(getConfig()) });
  return lucia;
}
