import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { uniqueViolation } from '~/lib/db/errors';
import { makeUser } from '../factories';
import { openTestDb, truncateAll } from '../test-database';

// The services tell a lost race on a unique key from any other failure by the error's code and constraint
// name; this checks the real server reports them as the helper reads them, including for an index on an
// expression (lower(email)), which has no constraint of its own.

const db = openTestDb();
afterAll(async () => {
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

async function errorOf(work: () => Promise<unknown>): Promise<unknown> {
  try {
    await work();
  } catch (error) {
    return error;
  }
  throw new Error('expected the write to fail');
}

describe('uniqueViolation against PostgreSQL', () => {
  test('a second account for the same address in another letter case names users_email_lower_key', async () => {
    await makeUser(db, { email: 'ada@example.test' });
    const error = await errorOf(() => makeUser(db, { email: 'Ada@Example.test' }));
    expect(uniqueViolation(error, 'users_email_lower_key')).toBe(true);
    expect(uniqueViolation(error, 'users_pkey')).toBe(false);
  });

  test('another failure (a missing foreign row) is not a unique violation', async () => {
    const error = await errorOf(() =>
      db
        .insertInto('crew_members')
        .values({ crew_id: '00000000-0000-4000-8000-000000000000', user_id: 'nobody', role: 'rider' })
        .execute(),
    );
    expect(uniqueViolation(error, 'users_email_lower_key')).toBe(false);
    expect((error as { code?: string }).code).toBe('23503'); // foreign_key_violation (PostgreSQL manual, Appendix A)
  });
});
