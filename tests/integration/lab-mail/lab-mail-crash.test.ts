// Nothing is lost on a crash between receipt and storage: a worker killed (SIGKILL) inside a message's
// transaction leaves it "received"; a fresh worker (pg-boss, as scripts/worker.ts runs it) processes it once.
import { spawn } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeEach, expect, test } from 'vitest';
import { createMailTransport } from '~/lib/mail/transport';
import { receiveInboundMail } from '~/lib/lab-mail/lab-mail.service';
import { startJobQueue, stopJobQueue } from '~/lib/queue/job-queue';
import { registerJobs } from '~/lib/queue/jobs';
import { waitFor } from '../mail/mail-helpers';
import { openTestDb, TEST_DATABASE, truncateAll } from '../test-database';
import { composeMail, countLabFiles, DOMAIN, env, LAB_CSV, makeLabWorkbook, makeMailCrew } from './lab-mail-fixtures';

const db = openTestDb();
const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '../../..');

afterAll(async () => {
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

function runCrashWorker(): Promise<{ signal: NodeJS.Signals | null; out: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(
      process.execPath,
      ['--import', 'tsx', path.join(here, 'crash-worker.ts'), TEST_DATABASE.url()],
      { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] },
    );
    let out = '';
    child.stdout.on('data', (d: Buffer) => (out += d.toString()));
    child.stderr.on('data', (d: Buffer) => (out += d.toString()));
    child.on('error', reject);
    child.on('exit', (_code, signal) => resolve({ signal, out }));
  });
}

test('a worker killed between receipt and storage loses nothing: the message is processed once after restart', async () => {
  const { crew, address } = await makeMailCrew(db);
  const raw = await composeMail({
    to: address,
    attachments: [
      { filename: 'a.csv', content: LAB_CSV },
      { filename: 'b.xlsx', content: await makeLabWorkbook() },
    ],
  });
  const received = await receiveInboundMail(db, {
    via: 'smtp',
    envelopeFrom: null,
    recipient: address,
    raw,
    domain: DOMAIN,
  });
  expect(received.status).toBe('received');

  const crash = await runCrashWorker();
  expect(crash.signal).toBe('SIGKILL');
  expect(crash.out).toContain('stored-in-transaction 2');
  // The kill rolled the transaction back: the message waits, no file and no notice exists.
  const waiting = await db.selectFrom('inbound_mails').select(['status', 'lab_file_ids']).executeTakeFirstOrThrow();
  expect(waiting.status).toBe('received');
  expect(await countLabFiles(db, crew.id)).toBe(0);
  expect(await db.selectFrom('mail_outbox').selectAll().execute()).toEqual([]);

  // A fresh worker: the job's start-up catch-up finds the message.
  const schema = 'pgboss_lab_mail_test';
  const boss = await startJobQueue({ connectionString: TEST_DATABASE.url(), schema, max: 3, onError: () => {} });
  const transport = createMailTransport('smtp://127.0.0.1:9');
  const registrations = await registerJobs(boss, {
    db,
    transport,
    config: { DATABASE_URL: TEST_DATABASE.url(), MAIL_FROM: 'Sumpwise <no-reply@sumpwise.test>' },
    log: () => {},
    mail: { tickSeconds: 60 },
    labMail: { tickSeconds: 0.3, pollingIntervalSeconds: 0.5, env },
  });
  try {
    await waitFor(
      async () =>
        (await db.selectFrom('inbound_mails').select('status').executeTakeFirstOrThrow()).status === 'processed',
      15_000,
      'the message to be processed',
    );
    // More ticks run; none may process it again.
    await new Promise((r) => setTimeout(r, 1_500));
  } finally {
    await stopJobQueue(boss, registrations, 5_000);
    transport.close();
  }
  expect(await countLabFiles(db, crew.id)).toBe(2);
  const done = await db.selectFrom('inbound_mails').selectAll().executeTakeFirstOrThrow();
  expect(done.lab_file_ids).toHaveLength(2);
  // One notice per recipient (lead and mechanic), not one per attempt.
  expect(await db.selectFrom('mail_outbox').select('to_address').execute()).toHaveLength(2);
}, 60_000);
