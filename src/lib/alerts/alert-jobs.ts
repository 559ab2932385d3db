/**
 * The alert and reminder jobs of the worker, scheduled with pg-boss's own cron (kept in its schema, so a
 * schedule survives restarts and several workers fire it once). The jobs read the clock when they run; the
 * functions they call take `now`, so tests simulate any time without waiting for cron.
 */
import type PgBoss from 'pg-boss';
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import type { JobRegistration } from '../queue/job-queue';
import { runReminders } from '../reminders/reminders.service';
import { sendDailyDigests } from './alerts.service';
import type { AlertEnv } from './alerts';

/** The reminder run: hourly, so a due date is noticed the same morning; a repeat sends nothing twice. */
export const REMINDERS_QUEUE = 'alerts.reminders';
/** The daily digest. */
export const DIGEST_QUEUE = 'alerts.digest';

/** Cron expressions in UTC (pg-boss 10 `schedule(name, cron, data, { tz })`). */
export const ALERT_SCHEDULES = {
  [REMINDERS_QUEUE]: '17 * * * *',
  // 06:30 UTC: morning in Europe, before the ride; late evening the day before on the American west coast.
  [DIGEST_QUEUE]: '30 6 * * *',
} as const;

export interface AlertJobOptions {
  db: Kysely<Database>;
  /** Links and signing key; read from the configuration when absent. */
  env?: AlertEnv;
  /** The clock; tests pass a fixed one. */
  now?: () => Date;
  pollingIntervalSeconds?: number;
  log?: (line: string) => void;
}

/** Creates the alert queues, their schedules and workers on a started pg-boss. */
export async function registerAlertJobs(boss: PgBoss, options: AlertJobOptions): Promise<JobRegistration> {
  const log = options.log ?? ((line: string) => console.log(line));
  const now = options.now ?? (() => new Date());
  const env = options.env ? { env: options.env } : {};
  for (const name of [REMINDERS_QUEUE, DIGEST_QUEUE] as const) {
    // `stately`: at most one run queued and one active, so a slow run is never overlapped by the next tick.
    await boss.createQueue(name, {
      name,
      policy: 'stately',
      retryLimit: 3,
      retryDelay: 60,
      retryBackoff: true,
      expireInSeconds: 30 * 60,
    });
    await boss.schedule(name, ALERT_SCHEDULES[name], {}, { tz: 'UTC' });
  }
  const polling = { pollingIntervalSeconds: options.pollingIntervalSeconds ?? 30 };
  await boss.work(REMINDERS_QUEUE, polling, async () => {
    const report = await runReminders(options.db, { now: now(), ...env });
    const queued =
      (report.sampleDue.immediate ?? 0) +
      (report.shippedOverdue.immediate ?? 0) +
      (report.invitationPending.immediate ?? 0);
    if (queued > 0) log(`[alerts] reminders: ${queued} queued`);
    return report;
  });
  await boss.work(DIGEST_QUEUE, polling, async () => {
    const report = await sendDailyDigests(options.db, { now: now(), ...env });
    if (report.queued > 0) log(`[alerts] digests: ${report.queued} queued`);
    return report;
  });
  return {
    name: `${REMINDERS_QUEUE}, ${DIGEST_QUEUE}`,
    async stop() {
      await boss.offWork(REMINDERS_QUEUE);
      await boss.offWork(DIGEST_QUEUE);
    },
  };
}
