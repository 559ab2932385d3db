import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, TEST_DATABASE, truncateAll } from '../test-database';
import { queueMail } from '~/lib/mail/mail.service';
import { startMailRelay, type RunningMailRelay } from '~/lib/mail/relay';
import { createMailTransport, type MailTransport } from '~/lib/mail/transport';
import { startJobQueue, stopJobQueue, type JobRegistration, type PgBoss } from '~/lib/queue/job-queue';
import { registerJobs } from '~/lib/queue/jobs';
import { countReceived, pause, queueTestMail, testMail, waitFor } from './mail-helpers';
import { addMember, makeCrew, makeUser } from '../factories';
import { makeAuthDeps } from '../auth/auth-test-deps';
import { inviteMember } from '~/lib/crews/crews.service';
import { findMembership } from '~/lib/crews/crews.repository';

// The whole path as it runs in production: pg-boss on the real test database, the mail.flush job, a real
// SMTP relay in-process on a free port. pg-boss gets its own schema so the dev queue is never touched.
const SCHEMA = 'pgboss_mail_test';
const db = openTestDb();
let relay: RunningMailRelay;
let transport: MailTransport;
const workers: { boss: PgBoss; registrations: JobRegistration[] }[] = [];
const silent = () => {};

/** Starts one worker like scripts/worker.ts does, with a short tick, polling interval and backoff. */
async function startWorker() {
  const boss = await startJobQueue({ connectionString: TEST_DATABASE.url(), schema: SCHEMA, max: 3, onError: silent });
  const registrations = await registerJobs(boss, {
    db,
    transport,
    config: { DATABASE_URL: TEST_DATABASE.url(), MAIL_FROM: 'Sumpwise <no-reply@sumpwise.test>' },
    log: silent,
    mail: { tickSeconds: 0.3, pollingIntervalSeconds: 0.5, backoff: { baseMs: 100, maxMs: 300, maxAttempts: 1000 } },
  });
  const worker = { boss, registrations };
  workers.push(worker);
  return worker;
}

async function stopWorker(worker: { boss: PgBoss; registrations: JobRegistration[] }) {
  await stopJobQueue(worker.boss, worker.registrations, 5_000);
  workers.splice(workers.indexOf(worker), 1);
}

beforeAll(async () => {
  relay = await startMailRelay({ db, port: 0 });
  transport = createMailTransport(`smtp://127.0.0.1:${relay.port}`);
  await startWorker();
});
afterAll(async () => {
  for (const w of [...workers]) await stopWorker(w);
  transport.close();
  await relay.close();
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

describe('the worker (pg-boss mail.flush)', () => {
  test('delivers a queued message exactly once', async () => {
    await queueTestMail(db, 'worker-once');
    await waitFor(async () => (await countReceived(db, 'worker-once')) > 0, 10_000, 'the message to arrive');
    // Several more ticks and flushes run: none may send it again.
    await pause(1_500);
    expect(await countReceived(db, 'worker-once')).toBe(1);
    const row = await db.selectFrom('mail_outbox').selectAll().executeTakeFirstOrThrow();
    expect(row.sent_at).toBeInstanceOf(Date);
    expect(row.attempts).toBe(1);
  });

  test('a message queued in a rolled-back transaction never arrives', async () => {
    await expect(
      db.transaction().execute(async (trx) => {
        await queueMail(trx, testMail('worker-rolled-back'));
        throw new Error('invitation failed');
      }),
    ).rejects.toThrow('invitation failed');
    // A committed message queued after it shows the worker was running all along.
    await queueTestMail(db, 'worker-after-rollback');
    await waitFor(
      async () => (await countReceived(db, 'worker-after-rollback')) === 1,
      10_000,
      'the committed message',
    );
    await pause(600);
    expect(await countReceived(db, 'worker-rolled-back')).toBe(0);
  });

  test('with the relay stopped the message waits (attempts counted); after restart it arrives exactly once', async () => {
    const port = relay.port;
    await relay.close();
    try {
      await queueTestMail(db, 'worker-outage');
      await waitFor(
        async () => {
          const row = await db.selectFrom('mail_outbox').select('attempts').executeTakeFirst();
          return (row?.attempts ?? 0) >= 3;
        },
        15_000,
        'three failed attempts',
      );
      const waiting = await db.selectFrom('mail_outbox').selectAll().executeTakeFirstOrThrow();
      expect(waiting.sent_at).toBeNull();
      expect(waiting.failed_at).toBeNull();
      expect(waiting.last_error).toMatch(/ECONNREFUSED|ESOCKET|connect/i);
    } finally {
      relay = await startMailRelay({ db, port });
    }
    await waitFor(
      async () => (await countReceived(db, 'worker-outage')) > 0,
      10_000,
      'delivery after the relay returned',
    );
    await pause(1_500);
    expect(await countReceived(db, 'worker-outage')).toBe(1);
    const sent = await db.selectFrom('mail_outbox').selectAll().executeTakeFirstOrThrow();
    expect(sent.sent_at).toBeInstanceOf(Date);
    expect(sent.attempts).toBeGreaterThanOrEqual(4);
  });

  test('two workers racing deliver every message once', async () => {
    const second = await startWorker();
    try {
      const keys = Array.from({ length: 20 }, (_, i) => `worker-race-${i}`);
      // Queued together in one transaction: both workers are woken by the same commit.
      await db.transaction().execute(async (trx) => {
        for (const k of keys) await queueMail(trx, testMail(k));
      });
      await waitFor(
        async () => {
          const row = await db
            .selectFrom('mail_outbox')
            .select((eb) => eb.fn.countAll<number>().as('n'))
            .where('sent_at', 'is not', null)
            .executeTakeFirstOrThrow();
          return Number(row.n) === keys.length;
        },
        15_000,
        'all twenty messages to be sent',
      );
      await pause(1_000);
      for (const k of keys) expect(await countReceived(db, k), k).toBe(1);
    } finally {
      await stopWorker(second);
    }
  });

  test('an invitation sent while the relay is stopped arrives exactly once after it starts again', async () => {
    const { deps, pool } = makeAuthDeps(db);
    const port = relay.port;
    try {
      const crew = await makeCrew(db, 'Outage crew');
      const lead = await makeUser(db, { email: 'lead@example.test', displayName: 'Lead' });
      await addMember(db, crew.id, lead.id, 'lead');
      await relay.close();
      const actor = { userId: lead.id, displayName: 'Lead', membership: await findMembership(db, crew.id, lead.id) };
      const sent = await inviteMember(
        deps,
        actor,
        { email: 'mechanic@example.test', role: 'mechanic' },
        { ip: '192.0.2.30' },
      );
      expect(sent.ok).toBe(true);
      await waitFor(
        async () => ((await db.selectFrom('mail_outbox').select('attempts').executeTakeFirst())?.attempts ?? 0) >= 2,
        15_000,
        'failed attempts while the relay is down',
      );
      const arrivedWhileDown = await db
        .selectFrom('dev_mailbox')
        .selectAll()
        .where('envelope_to', 'like', '%mechanic@example.test%')
        .execute();
      expect(arrivedWhileDown).toHaveLength(0);
    } finally {
      relay = await startMailRelay({ db, port });
      await pool.end();
    }
    const received = () =>
      db
        .selectFrom('dev_mailbox')
        .select(['subject'])
        .where('envelope_to', 'like', '%mechanic@example.test%')
        .execute();
    await waitFor(async () => (await received()).length > 0, 10_000, 'the invitation after the relay returned');
    await pause(1_500);
    const mail = await received();
    expect(mail).toHaveLength(1);
    expect(mail[0]!.subject).toMatch(/Outage crew/);
  });
});
