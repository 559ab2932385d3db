import type PgBoss from 'pg-boss';
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import type { JobRegistration } from '../queue/job-queue';
import { registerWakeableJob } from '../queue/wakeable-job';
import type { BackoffPolicy } from './mail';
import { MAIL_OUTBOX_CHANNEL } from './mail.repository';
import { deliverDueMail } from './mail.service';
import type { MailTransport } from './transport';

/** The pg-boss queue whose jobs flush the mail outbox. */
export const MAIL_FLUSH_QUEUE = 'mail.flush';

export interface MailJobOptions {
  db: Kysely<Database>;
  transport: MailTransport;
  from: string;
  /** Where to LISTEN for new outbox rows; without it new mail waits for the next tick. */
  listenConnectionString?: string;
  /** How often a flush is queued regardless of notifications (retries falling due, missed wake-ups). */
  tickSeconds?: number;
  /** How often the pg-boss worker looks for a flush job (it is also woken directly). */
  pollingIntervalSeconds?: number;
  batchSize?: number;
  backoff?: BackoffPolicy;
  log?: (line: string) => void;
}

/** Registers the mail delivery job (`mail.flush`) on a started pg-boss; see mail.service.ts for the design. */
export async function registerMailJobs(boss: PgBoss, options: MailJobOptions): Promise<JobRegistration> {
  const log = options.log ?? ((line: string) => console.log(line));
  const batchSize = options.batchSize ?? 50;
  // `short`: at most one flush waits at a time, so a burst of notifications queues one flush, not many.
  // pg-boss's retry only covers a flush that failed on a database error; per-message retries live in the outbox.
  await boss.createQueue(MAIL_FLUSH_QUEUE, {
    name: MAIL_FLUSH_QUEUE,
    policy: 'short',
    retryLimit: 3,
    retryDelay: 5,
    retryBackoff: true,
    expireInSeconds: 15 * 60,
  });

  return registerWakeableJob(boss, {
    name: MAIL_FLUSH_QUEUE,
    ...(options.listenConnectionString
      ? { listen: { connectionString: options.listenConnectionString, channel: MAIL_OUTBOX_CHANNEL } }
      : {}),
    tickSeconds: options.tickSeconds ?? 15,
    pollingIntervalSeconds: options.pollingIntervalSeconds ?? 2,
    log,
    async run() {
      const report = await deliverDueMail(options.db, {
        transport: options.transport,
        from: options.from,
        batchSize,
        ...(options.backoff ? { backoff: options.backoff } : {}),
      });
      if (report.sent + report.deferred + report.failed > 0) {
        log(`[mail] flush: ${report.sent} sent, ${report.deferred} deferred, ${report.failed} failed`);
      }
      // A full batch means more may be waiting: queue the next flush now rather than at the next tick.
      return { result: report, moreWaiting: report.sent + report.deferred + report.failed >= batchSize };
    },
  });
}
