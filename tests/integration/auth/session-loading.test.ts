import pg from 'pg';
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type { AstroCookies } from 'astro';
import { createLucia, loadSession, SESSION_COOKIE } from '~/lib/auth/session';
import { openTestDb, TEST_DATABASE, truncateAll } from '../test-database';
import { addMember, makeCrew, makeUser } from '../factories';

const db = openTestDb();
const pool = new pg.Pool({ connectionString: TEST_DATABASE.url(), max: 3 });
// Every statement Lucia's adapter sends, counted.
const sent: string[] = [];
const countingPool = new Proxy(pool, {
  get(target, prop, receiver) {
    if (prop === 'query')
      return (...args: Parameters<pg.Pool['query']>) => {
        sent.push(String(typeof args[0] === 'string' ? args[0] : (args[0] as { text: string }).text));
        return (target.query as (...a: unknown[]) => unknown)(...args);
      };
    return Reflect.get(target, prop, receiver);
  },
});
const lucia = createLucia(countingPool, { secure: false });
afterAll(async () => {
  await pool.end();
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
  sent.length = 0;
});

/** Cookies as Astro hands them to the middleware: the session cookie in, anything set kept. */
function cookiesWith(sessionId: string | null) {
  const set = new Map<string, string>();
  const cookies = {
    get: (name: string) => (name === SESSION_COOKIE && sessionId !== null ? { value: sessionId } : undefined),
    set: (name: string, value: string) => void set.set(name, value),
  } as unknown as AstroCookies;
  return { cookies, set };
}

/** A rider in three crews joined a day apart (the newest crew's name sorts first), with a session in `current`. */
async function riderInThreeCrews(current: 'second' | 'none' | 'left') {
  const user = await makeUser(db, { email: 'rider@example.test', displayName: 'Rider' });
  const crews = [];
  for (const [i, name] of ['Mill Lane', 'Hollow Rd', 'Abbey Yard'].entries()) {
    const crew = await makeCrew(db, name);
    await addMember(db, crew.id, user.id, i === 1 ? 'mechanic' : 'rider');
    await db
      .updateTable('crew_members')
      .set({ joined_at: new Date(Date.UTC(2026, 0, 1 + i)) })
      .where('crew_id', '=', crew.id)
      .execute();
    crews.push(crew);
  }
  const left = await makeCrew(db, 'Left long ago');
  const session = await lucia.createSession(user.id, {
    current_crew_id: current === 'second' ? crews[1]!.id : current === 'left' ? left.id : null,
  });
  sent.length = 0;
  return { user, crews, session };
}

describe('loading the session behind a cookie', () => {
  test('the session, its user and their crews come from one query, crews oldest membership first', async () => {
    const { user, crews, session } = await riderInThreeCrews('second');
    const { cookies, set } = cookiesWith(session.id);
    const loaded = await loadSession(lucia, cookies);
    expect(sent).toHaveLength(1);
    expect(loaded).toMatchObject({
      user: { id: user.id, email: 'rider@example.test', displayName: 'Rider', emailVerified: true },
      session: { id: session.id, fresh: false },
      crews: [
        { crewId: crews[0]!.id, crewName: 'Mill Lane', role: 'rider' },
        { crewId: crews[1]!.id, crewName: 'Hollow Rd', role: 'mechanic' },
        { crewId: crews[2]!.id, crewName: 'Abbey Yard', role: 'rider' },
      ],
      crew: { crewId: crews[1]!.id, role: 'mechanic' },
    });
    expect(loaded!.crews).toHaveLength(3);
    expect(set.size).toBe(0);
  });

  test.each([
    ['no crew chosen', 'none'],
    ['a crew they have left', 'left'],
  ] as const)('with %s the session works in their first crew', async (_, current) => {
    const { crews, session } = await riderInThreeCrews(current);
    const loaded = await loadSession(lucia, cookiesWith(session.id).cookies);
    expect(loaded!.crew).toEqual({ crewId: crews[0]!.id, crewName: 'Mill Lane', role: 'rider' });
  });

  test('a user in no crew has an empty list and no crew', async () => {
    const user = await makeUser(db);
    const session = await lucia.createSession(user.id, { current_crew_id: null });
    const loaded = await loadSession(lucia, cookiesWith(session.id).cookies);
    expect(loaded).toMatchObject({ crews: [], crew: null });
  });

  test('an unknown session is no one, and its cookie is cleared on a navigation', async () => {
    const { cookies, set } = cookiesWith('not-a-session-id');
    expect(await loadSession(lucia, cookies)).toBeNull();
    expect(set.get(SESSION_COOKIE)).toBe('');
    expect(await loadSession(lucia, cookiesWith(null).cookies)).toBeNull();
  });

  test('an expired session is no one and is deleted; one past half its life is extended (Lucia’s rule)', async () => {
    const { session } = await riderInThreeCrews('second');
    await db
      .updateTable('sessions')
      .set({ expires_at: new Date(Date.now() - 1000) })
      .where('id', '=', session.id)
      .execute();
    expect(await loadSession(lucia, cookiesWith(session.id).cookies)).toBeNull();
    expect(
      await db.selectFrom('sessions').select('id').where('id', '=', session.id).executeTakeFirst(),
    ).toBeUndefined();

    const other = await lucia.createSession((await makeUser(db)).id, { current_crew_id: null });
    // Lucia's sessions last 30 days and are extended once fewer than 15 remain.
    const soon = new Date(Date.now() + 5 * 86_400_000);
    await db.updateTable('sessions').set({ expires_at: soon }).where('id', '=', other.id).execute();
    const { cookies, set } = cookiesWith(other.id);
    const loaded = await loadSession(lucia, cookies);
    expect(loaded!.session.fresh).toBe(true);
    expect(set.get(SESSION_COOKIE)).toBe(other.id);
    const stored = await db
      .selectFrom('sessions')
      .select('expires_at')
      .where('id', '=', other.id)
      .executeTakeFirstOrThrow();
    expect(new Date(stored.expires_at).getTime()).toBeGreaterThan(soon.getTime() + 20 * 86_400_000);
  });
});
