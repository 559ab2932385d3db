import type PgBoss from 'pg-boss';
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import type { JobRegistration } from '../queue/job-queue';
import { deleteExpiredRateLimits } from './rate-limits.repository';

/** Hourly clean-up of spent rate-limit counters, so the table holds only live windows whatever an attacker tried. */
export const RATE_LIMIT_PRUNE_QUEUE = 'rate-limits.prune';
/** Cron in UTC: every hour at minute 41 (away from the reminders at 17). */
export const RATE_LIMIT_PRUNE_SCHEDULE = '41 * * * *';

/** Creates the prune queue, its schedule and its worker on a started pg-boss. */
export async function registerRateLimitJobs(
  boss: PgBoss,
  options: { db: Kysely<Database>; log?: (line: string) => void; pollingIntervalSeconds?: number },
): Promise<JobRegistration> {
  const log = options.log ?? ((line: string) => console.log(line));
  await boss.createQueue(RATE_LIMIT_PRUNE_QUEUE, {
    name: RATE_LIMIT_PRUNE_QUEUE,
    policy: 'stately',
    retryLimit: 2,
    retryDelay: 60,
    expireInSeconds: 10 * 60,
  });
  await boss.schedule(RATE_LIMIT_PRUNE_QUEUE, RATE_LIMIT_PRUNE_SCHEDULE, {}, { tz: 'UTC' });
  await boss.work(
    RATE_LIMIT_PRUNE_QUEUE,
    { pollingIntervalSeconds: options.pollingIntervalSeconds ?? 30 },
    async () => {
      const deleted = await deleteExpiredRateLimits(options.db);
      if (deleted > 0) log(`[rate-limits] pruned ${deleted} spent counters`);
      return { deleted };
    },
  );
  return {
    name: RATE_LIMIT_PRUNE_QUEUE,
    async stop() {
      await boss.offWork(RATE_LIMIT_PRUNE_QUEUE);
    },
  };
}
