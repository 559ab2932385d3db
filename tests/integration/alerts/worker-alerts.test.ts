import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import { RATE_LIMIT_PRUNE_QUEUE } from '~/lib/rate-limit/rate-limit-jobs';
import { ALERT_SCHEDULES, DIGEST_QUEUE, REMINDERS_QUEUE, registerAlertJobs } from '~/lib/alerts/alert-jobs';
import type { AlertEnv } from '~/lib/alerts/alerts';
import { registerMailJobs } from '~/lib/mail/mail-jobs';
import { startMailRelay, type RunningMailRelay } from '~/lib/mail/relay';
import { createMailTransport, type MailTransport } from '~/lib/mail/transport';
import { startJobQueue, stopJobQueue, type JobRegistration, type PgBoss } from '~/lib/queue/job-queue';
import { registerJobs } from '~/lib/queue/jobs';
import { pause, waitFor } from '../mail/mail-helpers';
import { makeSample } from '../lab-import/lab-import-fixtures';
import { openTestDb, TEST_DATABASE, truncateAll } from '../test-database';
import { makeAlertCrew } from './alert-fixtures';

// The worker as it runs in production (pg-boss on the test database in its own schema, the mail.flush job,
// the alert jobs, a real SMTP relay on a free port), with the mail helper's approach to outages: stop the
// relay, let attempts fail, start it again on the same port, and count what arrived.
const SCHEMA = 'pgboss_alerts_test';
const db = openTestDb();
const env: AlertEnv = { publicUrl: 'https://sumpwise.test', secret: 'worker-test-secret-of-at-least-32-chars' };
const silent = () => {};
let relay: RunningMailRelay;
let transport: MailTransport;
let boss: PgBoss;
let registrations: JobRegistration[] = [];

beforeAll(async () => {
  relay = await startMailRelay({ db, port: 0 });
  transport = createMailTransport(`smtp://127.0.0.1:${relay.port}`);
  boss = await startJobQueue({ connectionString: TEST_DATABASE.url(), schema: SCHEMA, max: 3, onError: silent });
  registrations = [
    await registerMailJobs(boss, {
      db,
      transport,
      from: 'Sumpwise <no-reply@sumpwise.test>',
      listenConnectionString: TEST_DATABASE.url(),
      log: silent,
      tickSeconds: 0.3,
      pollingIntervalSeconds: 0.5,
      backoff: { baseMs: 100, maxMs: 300, maxAttempts: 1000 },
    }),
    // A simulated clock: the job reads it when it runs, as it reads the real one in production.
    await registerAlertJobs(boss, {
      db,
      env,
      now: () => new Date('2026-03-22T07:17:00Z'),
      pollingIntervalSeconds: 0.5,
      log: silent,
    }),
  ];
});
afterAll(async () => {
  await stopJobQueue(boss, registrations, 5_000);
  transport.close();
  await relay.close();
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

const received = async (to: string) =>
  (await db.selectFrom('dev_mailbox').select('id').where('envelope_to', '=', to).execute()).length;

describe('alert jobs in the worker', () => {
  test('the reminder and digest queues are on pg-boss schedules (cron in UTC)', async () => {
    const schedules = await boss.getSchedules();
    const byName = new Map(schedules.map((s) => [s.name, s]));
    expect(byName.get(REMINDERS_QUEUE)).toMatchObject({ cron: ALERT_SCHEDULES[REMINDERS_QUEUE], timezone: 'UTC' });
    expect(byName.get(DIGEST_QUEUE)).toMatchObject({ cron: ALERT_SCHEDULES[DIGEST_QUEUE], timezone: 'UTC' });
  });

  test("the worker's job index registers them too", async () => {
    const other = await startJobQueue({
      connectionString: TEST_DATABASE.url(),
      schema: `${SCHEMA}_index`,
      max: 2,
      onError: silent,
    });
    try {
      const regs = await registerJobs(other, {
        db,
        transport,
        config: { DATABASE_URL: TEST_DATABASE.url(), MAIL_FROM: 'Sumpwise <no-reply@sumpwise.test>' },
        log: silent,
      });
      try {
        expect(regs.map((r) => r.name)).toContain(`${REMINDERS_QUEUE}, ${DIGEST_QUEUE}`);
        // Every scheduled family of the worker: the alerts, and the hourly prune of spent rate-limit counters.
        expect((await other.getSchedules()).map((s) => s.name).sort()).toEqual(
          [DIGEST_QUEUE, REMINDERS_QUEUE, RATE_LIMIT_PRUNE_QUEUE].sort(),
        );
      } finally {
        await stopJobQueue(other, regs, 5_000);
      }
    } finally {
      await other.stop({ graceful: false, wait: true }).catch(() => {});
    }
  });

  test('with the relay down the reminders wait; when it returns each arrives once, and a re-run job adds nothing', async () => {
    const c = await makeAlertCrew(db);
    const s = await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-LATE', { drawnOn: '2026-03-01' });
    await db
      .insertInto('sample_events')
      .values({ sample_id: s.id, state: 'shipped', actor_user_id: c.rider.id, at: new Date('2026-03-01T10:00:00Z') })
      .execute();
    const recipients = [c.rider.email, c.mechanic.email, c.lead.email];

    const port = relay.port;
    await relay.close();
    try {
      // What the schedule does each hour: a job on the queue.
      await boss.send(REMINDERS_QUEUE, {});
      await waitFor(
        async () => {
          const rows = await db
            .selectFrom('mail_outbox')
            .select('attempts')
            .where('kind', '=', 'reminder_shipped_overdue')
            .execute();
          return rows.length === 3 && rows.every((r) => r.attempts >= 2);
        },
        20_000,
        'three reminders queued and failing against the stopped relay',
      );
      const waiting = await db.selectFrom('mail_outbox').selectAll().execute();
      expect(waiting.every((r) => r.sent_at === null && r.failed_at === null)).toBe(true);
      // The job runs again while the relay is still down (the next hour): nothing new is queued.
      await boss.send(REMINDERS_QUEUE, {});
      await pause(1_500);
      expect(await db.selectFrom('mail_outbox').select('id').execute()).toHaveLength(3);
    } finally {
      relay = await startMailRelay({ db, port });
    }
    await waitFor(
      async () => {
        const counts = await Promise.all(recipients.map(received));
        return counts.every((n) => n > 0);
      },
      15_000,
      'every reminder to arrive after the relay returned',
    );
    await boss.send(REMINDERS_QUEUE, {});
    await pause(1_500);
    for (const to of recipients) expect(await received(to), to).toBe(1);
    const mail = await db
      .selectFrom('dev_mailbox')
      .selectAll()
      .where('envelope_to', '=', c.rider.email)
      .executeTakeFirstOrThrow();
    expect(mail.subject).toBe('No results yet: bottle SW-LATE of Ridge 450 (Valley school)');
    expect(mail.text_body).toContain('https://sumpwise.test/unsubscribe?token=');
    expect(mail.html_body).toContain('<a href="https://sumpwise.test/unsubscribe?token=');
  });
});
