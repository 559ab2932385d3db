import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import { SMTPServer } from 'smtp-server';
import type { AddressInfo } from 'node:net';
import { openTestDb, truncateAll } from '../test-database';
import { deriveMessageId } from '~/lib/mail/mail';
import { deliverDueMail, queueMail } from '~/lib/mail/mail.service';
import { startMailRelay, type RunningMailRelay } from '~/lib/mail/relay';
import { createMailTransport, type MailTransport } from '~/lib/mail/transport';
import { countReceived, pause, queueTestMail, testMail } from './mail-helpers';

// The outbox and its delivery, driven directly (no pg-boss): the guarantees live here.
const db = openTestDb();
let relay: RunningMailRelay;
let transport: MailTransport;
const FROM = 'Sumpwise <no-reply@sumpwise.test>';
// Short, so a retry falls due within the test; the shape of the policy is tested in the unit tests.
const backoff = { baseMs: 50, maxMs: 100, maxAttempts: 100 };

beforeAll(async () => {
  relay = await startMailRelay({ db, port: 0 });
  transport = createMailTransport(`smtp://127.0.0.1:${relay.port}`);
});
afterAll(async () => {
  transport.close();
  await relay.close();
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

describe('queueMail', () => {
  test('a rolled-back business transaction leaves nothing to send', async () => {
    await expect(
      db.transaction().execute(async (trx) => {
        await trx.insertInto('crews').values({ name: 'Valley trail school' }).execute();
        await queueMail(trx, testMail('rolled-back'));
        throw new Error('sign-up failed later');
      }),
    ).rejects.toThrow('sign-up failed later');
    expect(await db.selectFrom('mail_outbox').selectAll().execute()).toEqual([]);
    expect(await deliverDueMail(db, { transport, from: FROM, backoff })).toEqual({ sent: 0, deferred: 0, failed: 0 });
    expect(await countReceived(db, 'rolled-back')).toBe(0);
  });

  test('a committed business transaction queues its message', async () => {
    await db.transaction().execute(async (trx) => {
      await trx.insertInto('crews').values({ name: 'Valley trail school' }).execute();
      await queueMail(trx, testMail('committed'));
    });
    const rows = await db.selectFrom('mail_outbox').selectAll().execute();
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({
      idempotency_key: 'committed',
      kind: 'sample_reminder',
      attempts: 0,
      sent_at: null,
    });
  });

  test('the same idempotency key is queued once, even with different content', async () => {
    await queueMail(db, testMail('same-key'));
    await queueMail(db, { ...testMail('same-key'), subject: 'A second try' });
    await db.transaction().execute((trx) => queueMail(trx, testMail('same-key')));
    const rows = await db.selectFrom('mail_outbox').select(['subject']).execute();
    expect(rows).toEqual([{ subject: 'Sample due (same-key)' }]);
  });

  test('rejects a message whose subject would inject a header', async () => {
    await expect(queueMail(db, { ...testMail('inject'), subject: 'hi\r\nBcc: all@example.test' })).rejects.toThrow();
    expect(await db.selectFrom('mail_outbox').selectAll().execute()).toEqual([]);
  });
});

describe('deliverDueMail', () => {
  test('delivers a queued message exactly once, with the Message-ID derived from its key', async () => {
    await queueTestMail(db, 'once');
    expect(await deliverDueMail(db, { transport, from: FROM, backoff })).toEqual({ sent: 1, deferred: 0, failed: 0 });
    // Later flushes find nothing: the row is marked sent.
    expect(await deliverDueMail(db, { transport, from: FROM, backoff })).toEqual({ sent: 0, deferred: 0, failed: 0 });
    expect(await countReceived(db, 'once')).toBe(1);
    const received = await db.selectFrom('dev_mailbox').selectAll().executeTakeFirstOrThrow();
    expect(received.message_id).toBe(deriveMessageId('once', FROM));
    expect(received.envelope_to).toBe('rider@example.test');
    expect(received.text_body).toContain('Open the drain card:\nhttps://sumpwise.test/samples/new');
    expect(received.html_body).toContain('href="https://sumpwise.test/samples/new"');
    const row = await db.selectFrom('mail_outbox').selectAll().executeTakeFirstOrThrow();
    expect(row.sent_at).toBeInstanceOf(Date);
    expect(row.attempts).toBe(1);
    expect(row.relay_response).toMatch(/^250 /);
  });

  test('with the relay down the message waits with its attempts counted, then arrives exactly once', async () => {
    const port = relay.port;
    await queueTestMail(db, 'outage');
    await relay.close();
    try {
      for (let i = 0; i < 3; i++) {
        expect(await deliverDueMail(db, { transport, from: FROM, backoff })).toEqual({
          sent: 0,
          deferred: 1,
          failed: 0,
        });
        await pause(120);
      }
      const waiting = await db.selectFrom('mail_outbox').selectAll().executeTakeFirstOrThrow();
      expect(waiting.attempts).toBe(3);
      expect(waiting.sent_at).toBeNull();
      expect(waiting.last_error).toMatch(/ECONNREFUSED|ESOCKET|connect/i);
      expect(waiting.next_attempt_at.getTime()).toBeGreaterThan(waiting.last_attempt_at!.getTime());
      // Not yet due again: an immediate flush leaves it alone (the backoff holds).
      expect(
        await deliverDueMail(db, { transport, from: FROM, backoff: { ...backoff, baseMs: 60_000, maxMs: 60_000 } }),
      ).toEqual({ sent: 0, deferred: 1, failed: 0 });
      expect(await deliverDueMail(db, { transport, from: FROM, backoff })).toEqual({ sent: 0, deferred: 0, failed: 0 });
      await db
        .updateTable('mail_outbox')
        .set({ next_attempt_at: new Date(Date.now() - 1000) })
        .execute();
    } finally {
      relay = await startMailRelay({ db, port });
    }
    expect(await deliverDueMail(db, { transport, from: FROM, backoff })).toEqual({ sent: 1, deferred: 0, failed: 0 });
    expect(await deliverDueMail(db, { transport, from: FROM, backoff })).toEqual({ sent: 0, deferred: 0, failed: 0 });
    expect(await countReceived(db, 'outage')).toBe(1);
    const sent = await db.selectFrom('mail_outbox').selectAll().executeTakeFirstOrThrow();
    expect(sent.attempts).toBe(5);
    expect(sent.sent_at).toBeInstanceOf(Date);
  });

  test('four flushes racing over twelve messages deliver each exactly once', async () => {
    const keys = Array.from({ length: 12 }, (_, i) => `race-${i}`);
    for (const k of keys) await queueTestMail(db, k);
    const reports = await Promise.all(
      Array.from({ length: 4 }, () => deliverDueMail(db, { transport, from: FROM, backoff })),
    );
    expect(reports.reduce((n, r) => n + r.sent, 0)).toBe(12);
    for (const k of keys) expect(await countReceived(db, k)).toBe(1);
  });

  test('a message already marked sent is never sent again', async () => {
    await queueTestMail(db, 'already-sent');
    await db.updateTable('mail_outbox').set({ sent_at: new Date() }).execute();
    expect(await deliverDueMail(db, { transport, from: FROM, backoff })).toEqual({ sent: 0, deferred: 0, failed: 0 });
    expect(await countReceived(db, 'already-sent')).toBe(0);
  });

  test('a recipient the relay refuses for good (550) is marked failed, not retried', async () => {
    const refusing = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      logger: false,
      onRcptTo(_address, _session, callback) {
        callback(Object.assign(new Error('no such mailbox'), { responseCode: 550 }));
      },
    });
    await new Promise<void>((resolve) => refusing.listen(0, '127.0.0.1', resolve));
    const refusingTransport = createMailTransport(
      `smtp://127.0.0.1:${(refusing.server.address() as AddressInfo).port}`,
    );
    try {
      await queueTestMail(db, 'refused');
      expect(await deliverDueMail(db, { transport: refusingTransport, from: FROM, backoff })).toEqual({
        sent: 0,
        deferred: 0,
        failed: 1,
      });
      const row = await db.selectFrom('mail_outbox').selectAll().executeTakeFirstOrThrow();
      expect(row.failed_at).toBeInstanceOf(Date);
      expect(row.last_error).toMatch(/550/);
      await db
        .updateTable('mail_outbox')
        .set({ next_attempt_at: new Date(Date.now() - 1000) })
        .execute();
      expect(await deliverDueMail(db, { transport, from: FROM, backoff })).toEqual({ sent: 0, deferred: 0, failed: 0 });
    } finally {
      refusingTransport.close();
      await new Promise<void>((resolve) => refusing.close(() => resolve()));
    }
  });

  test('gives up after maxAttempts failures', async () => {
    await queueTestMail(db, 'exhausted');
    const port = relay.port;
    await relay.close();
    try {
      const tight = { baseMs: 0, maxMs: 0, maxAttempts: 2 };
      expect(await deliverDueMail(db, { transport, from: FROM, backoff: tight })).toEqual({
        sent: 0,
        deferred: 1,
        failed: 0,
      });
      expect(await deliverDueMail(db, { transport, from: FROM, backoff: tight })).toEqual({
        sent: 0,
        deferred: 0,
        failed: 1,
      });
    } finally {
      relay = await startMailRelay({ db, port });
    }
    const row = await db.selectFrom('mail_outbox').selectAll().executeTakeFirstOrThrow();
    expect(row).toMatchObject({ attempts: 2, sent_at: null });
    expect(row.failed_at).toBeInstanceOf(Date);
  });
});
