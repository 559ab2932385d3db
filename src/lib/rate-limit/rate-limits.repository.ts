import type { Kysely } from 'kysely';
import type { Database } from '../db/database';

/** Deletes rate-limit counters whose window ended before `now`; returns how many went. */
export async function deleteExpiredRateLimits(db: Kysely<Database>, now: Date = new Date()): Promise<number> {
  // expire is milliseconds since the epoch (rate-limiter-flexible's layout).
  const result = await db
    .deleteFrom('rate_limits')
    .where('expire', 'is not', null)
    .where('expire', '<', now.getTime())
    .executeTakeFirst();
  return Number(result.numDeletedRows);
}
