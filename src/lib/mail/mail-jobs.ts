import pg from 'pg';
import type PgBoss from 'pg-boss';
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import type { JobRegistration } from '../queue/job-queue';
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
    name: MAIL_FLUSH_QUEUE, policy: 'short', retryLimit: 3, retryDelay: 5, retryBackoff: true, expireInSeconds: 15 * 60,
  });

  let stopped = false;
  let workerId: string | undefined;
  const trigger = async (): Promise<void> => {
    if (stopped) return;
    try {
      await boss.send(MAIL_FLUSH_QUEUE, {});
      if (workerId) boss.notifyWorker(workerId);
    } catch (error) {
      log(`[mail] could not queue a flush: ${errorMessage(error)}`);
    }
  };

  workerId = await boss.work(MAIL_FLUSH_QUEUE, { pollingIntervalSeconds: options.pollingIntervalSeconds ?? 2 }, async () => {
    const report = await deliverDueMail(options.db, {
      transport: options.transport, from: options.from, batchSize, ...(options.backoff ? { backoff: options.backoff } : {}),
    });
    if (report.sent + report.deferred + report.failed > 0) {
      log(`[mail] flush: ${report.sent} sent, ${report.deferred} deferred, ${report.failed} failed`);
    }
    // A full batch means more may be waiting: queue the next flush now rather than at the next tick.
    if (report.sent + report.deferred + report.failed >= batchSize) void trigger();
    return report;
  });

  const listener = options.listenConnectionString
    ? listenForChannel(options.listenConnectionString, MAIL_OUTBOX_CHANNEL, () => void trigger(), log)
    : undefined;
  const tick = setInterval(() => void trigger(), (options.tickSeconds ?? 15) * 1000);
  tick.unref();
  // Catch up on whatever was queued while no worker was running.
  await trigger();

  return {
    name: MAIL_FLUSH_QUEUE,
    async stop() {
      stopped = true;
      clearInterval(tick);
      await listener?.close();
      await boss.offWork(MAIL_FLUSH_QUEUE);
    },
  };
}

/** LISTENs on a channel (the outbox's, the inbound mail's) with its own connection, reconnecting after a lost connection. */
export function listenForChannel(connectionString: string, channel: string, onNotify: () => void, log: (line: string) => void) {
  let client: pg.Client | undefined;
  let closed = false;
  let retry: NodeJS.Timeout | undefined;

  const connect = async (): Promise<void> => {
    const c = new pg.Client({ connectionString, application_name: 'sumpwise-mail-listener' });
    c.on('notification', onNotify);
    c.on('error', (error) => {
      log(`[queue] listener on ${channel} lost its connection: ${error.message}; the tick still runs`);
      void c.end().catch(() => {});
      scheduleReconnect();
    });
    try {
      await c.connect();
      await c.query(`LISTEN ${channel}`);
      if (closed) {
        await c.end();
        return;
      }
      client = c;
      // Anything committed while we were not listening.
      onNotify();
    } catch (error) {
      log(`[queue] listener on ${channel} could not connect: ${errorMessage(error)}`);
      void c.end().catch(() => {});
      scheduleReconnect();
    }
  };
  const scheduleReconnect = () => {
    client = undefined;
    if (closed || retry) return;
    retry = setTimeout(() => {
      retry = undefined;
      void connect();
    }, 5_000);
    retry.unref();
  };
  void connect();

  return {
    async close() {
      closed = true;
      if (retry) clearTimeout(retry);
      await client?.end().catch(() => {});
    },
  };
}

function errorMessage(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}
