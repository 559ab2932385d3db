/**
 * The worker side of lab reports by mail: the pg-boss queue `lab-mail.process` processes every message
 * stored as "received" (see lab-mail.service.ts). A flush is queued when a stored message NOTIFYs, on a
 * tick (messages stored while the listener was reconnecting, or before a crash), and when the worker starts.
 */
import type PgBoss from 'pg-boss';
import type { Kysely } from 'kysely';
import type { AlertEnv } from '../alerts/alerts';
import type { Database } from '../db/database';
import type { JobRegistration } from '../queue/job-queue';
import { registerWakeableJob } from '../queue/wakeable-job';
import { INBOUND_MAIL_CHANNEL } from './lab-mail.repository';
import { processInboundMails, type ProcessHooks } from './lab-mail.service';

export const LAB_MAIL_QUEUE = 'lab-mail.process';

export interface LabMailJobOptions {
  db: Kysely<Database>;
  listenConnectionString?: string;
  env?: AlertEnv;
  tickSeconds?: number;
  pollingIntervalSeconds?: number;
  hooks?: ProcessHooks;
  log?: (line: string) => void;
}

/** Registers the inbound lab mail job on a started pg-boss. */
export async function registerLabMailJobs(boss: PgBoss, options: LabMailJobOptions): Promise<JobRegistration> {
  const log = options.log ?? ((line: string) => console.log(line));
  // `short`: at most one run waits; a run processes every waiting message, so a burst needs one.
  await boss.createQueue(LAB_MAIL_QUEUE, {
    name: LAB_MAIL_QUEUE,
    policy: 'short',
    retryLimit: 3,
    retryDelay: 10,
    retryBackoff: true,
    expireInSeconds: 15 * 60,
  });
  return registerWakeableJob(boss, {
    name: LAB_MAIL_QUEUE,
    ...(options.listenConnectionString
      ? { listen: { connectionString: options.listenConnectionString, channel: INBOUND_MAIL_CHANNEL } }
      : {}),
    tickSeconds: options.tickSeconds ?? 15,
    pollingIntervalSeconds: options.pollingIntervalSeconds ?? 2,
    log,
    async run() {
      const report = await processInboundMails(options.db, {
        ...(options.env ? { env: options.env } : {}),
        ...(options.hooks ? { hooks: options.hooks } : {}),
        log,
      });
      // A full run (50 messages) means more may be waiting.
      return { result: report, moreWaiting: report.processed + report.setAside >= 50 };
    },
  });
}
