import type PgBoss from 'pg-boss';
import type { Kysely } from 'kysely';
import type { AppConfig } from '../config';
import type { Database } from '../db/database';
import { registerMailJobs, type MailJobOptions } from '../mail/mail-jobs';
import type { MailTransport } from '../mail/transport';
import type { JobRegistration } from './job-queue';
import type { LabMailJobOptions } from '../lab-mail/lab-mail-jobs';
import { registerRateLimitJobs } from '../rate-limit/rate-limit-jobs';

// Every job family the worker runs is registered here: its queues and pg-boss schedules
// (`boss.schedule(name, cron)`), each entry returning a JobRegistration.

export interface JobDependencies {
  db: Kysely<Database>;
  config: Pick<AppConfig, 'DATABASE_URL' | 'MAIL_FROM'>;
  transport: MailTransport;
  log?: (line: string) => void;
  /** Overrides for the mail job (tests shorten its tick and backoff). */
  mail?: Partial<Pick<MailJobOptions, 'tickSeconds' | 'pollingIntervalSeconds' | 'batchSize' | 'backoff'>>;
  /** Overrides for the inbound lab mail job (tests). */
  labMail?: Partial<Pick<LabMailJobOptions, 'tickSeconds' | 'pollingIntervalSeconds' | 'env' | 'hooks'>>;
}

/** Registers every job family on a started pg-boss; stop them with stopJobQueue. */
export async function registerJobs(boss: PgBoss, deps: JobDependencies): Promise<JobRegistration[]> {
  const registrations: JobRegistration[] = [];
  registrations.push(
    await registerMailJobs(boss, {
      db: deps.db,
      transport: deps.transport,
      from: deps.config.MAIL_FROM,
      listenConnectionString: deps.config.DATABASE_URL,
      ...(deps.log ? { log: deps.log } : {}),
      ...deps.mail,
    }),
  );
  registrations.push(
    await (
      await import('../alerts/alert-jobs')
    ).registerAlertJobs(boss, { db: deps.db, ...(deps.log ? { log: deps.log } : {}) }),
  );
  // Lab reports that arrived by mail (stored raw by the relay or the webhook) become lab files here.
  registrations.push(
    await (
      await import('../lab-mail/lab-mail-jobs')
    ).registerLabMailJobs(boss, {
      db: deps.db,
      listenConnectionString: deps.config.DATABASE_URL,
      ...(deps.log ? { log: deps.log } : {}),
      ...deps.labMail,
    }),
  );
  registrations.push(await registerRateLimitJobs(boss, { db: deps.db, ...(deps.log ? { log: deps.log } : {}) }));
  return registrations;
}
