/*
 * How Sumpwise sends mail
 * =======================
 *
 * 1. Queueing (in the web process). A feature calls `queueMail(trx, mail)` inside its own business
 *    transaction. That writes one `mail_outbox` row and a `pg_notify` — both part of the caller's
 *    transaction: if the sign-up (or invitation, or reminder) rolls back, no row exists and no
 *    notification is delivered, so nothing is sent. The idempotency key is unique: queueing the same
 *    logical message twice (a retried request, a re-run job) writes nothing the second time. Nothing in the
 *    request path talks to SMTP or to pg-boss, so a relay or worker outage never fails a user's request.
 *
 * 2. Waking the worker. The worker (scripts/worker.ts) runs pg-boss. Its `mail.flush` queue (policy
 *    `short`: at most one flush waiting at a time) gets a job when (a) a committed outbox insert notifies
 *    the channel the worker LISTENs on, (b) a periodic tick fires (every 15 s by default: it picks up
 *    retries that have fallen due, and anything missed while the listener was reconnecting), and (c) the
 *    worker starts (catch-up after downtime).
 *
 * 3. Delivering (`deliverDueMail`). A flush takes due rows one at a time, each in its own transaction:
 *    `select … where sent_at is null and failed_at is null and next_attempt_at <= <flush start>
 *     for update skip locked limit 1`. The row lock is held while the message goes to the relay, so two
 *    workers (or two flushes) can never send the same row concurrently: the second skips it, and once the
 *    first commits the row no longer matches `sent_at is null`. `sent_at` is set only after the relay
 *    answered 250 (accepted), in the same transaction that held the lock.
 *
 * 4. Failures. A refused or unreachable relay counts an attempt (`attempts`, `last_error`) and moves
 *    `next_attempt_at` out by an exponential backoff (30 s doubling, capped at 30 min by default). During a
 *    relay outage messages simply wait; when it returns, the next tick delivers each of them once. A
 *    permanent refusal of the recipient (5xx to RCPT) or running out of attempts sets `failed_at` instead.
 *    pg-boss's own retry (3, with backoff) only covers a flush that crashed on a database error.
 *
 * 5. The remaining at-least-once window, honestly: if the relay accepts the message and then the worker
 *    dies (or loses its database connection) before the `sent_at` update commits, the lock is released
 *    with `sent_at` still null and the message is sent again on a later attempt. That window is the few
 *    milliseconds between the relay's 250 and our COMMIT; SMTP offers no way to close it. To make such a
 *    duplicate recognisable, every attempt of a message carries the same Message-ID, derived from its
 *    idempotency key, so clients and relays that collapse duplicates by Message-ID show it once.
 */
import type { Kysely, Transaction } from 'kysely';
import { getConfig } from '../config';
import type { Database, MailOutboxRow } from '../db/database';
import {
  DEFAULT_BACKOFF,
  computeRetryDelayMs,
  deriveMessageId,
  queuedMailSchema,
  type BackoffPolicy,
  type DeliveryReport,
  type QueuedMail,
} from './mail';
import {
  insertOutboxMail,
  lockNextDueMail,
  markMailSent,
  notifyOutbox,
  readDatabaseNow,
  recordMailFailure,
} from './mail.repository';
import type { MailTransport } from './transport';

/** Writes a message to the outbox inside the caller's transaction; a repeated idempotency key is a no-op. */
export async function queueMail(db: Kysely<Database> | Transaction<Database>, mail: QueuedMail): Promise<void> {
  const parsed = queuedMailSchema.parse(mail);
  const written = await insertOutboxMail(db, {
    idempotency_key: parsed.idempotencyKey,
    kind: parsed.kind,
    to_address: parsed.to,
    subject: parsed.subject,
    text_body: parsed.text,
    html_body: parsed.html,
    headers: parsed.headers ?? {},
    message_id: deriveMessageId(parsed.idempotencyKey, getConfig().MAIL_FROM),
  });
  if (written) await notifyOutbox(db);
}

export interface DeliverOptions {
  transport: MailTransport;
  /** The From header, e.g. MAIL_FROM. */
  from: string;
  /** At most this many messages per flush, so one flush does not hold a worker forever. */
  batchSize?: number;
  backoff?: BackoffPolicy;
}

/** Sends every due outbox message once (see the top of this file); returns what happened. */
export async function deliverDueMail(db: Kysely<Database>, options: DeliverOptions): Promise<DeliveryReport> {
  const report: DeliveryReport = { sent: 0, deferred: 0, failed: 0 };
  const batchSize = options.batchSize ?? 100;
  const backoff = options.backoff ?? DEFAULT_BACKOFF;
  // Only what was due when the flush began: a message that fails now is retried by a later flush, never
  // again within this one, however short its backoff.
  const dueBy = await readDatabaseNow(db);
  for (let i = 0; i < batchSize; i++) {
    const outcome = await db.transaction().execute((trx) => deliverOne(trx, dueBy, options, backoff));
    if (outcome === 'none') break;
    report[outcome] += 1;
  }
  return report;
}

async function deliverOne(
  trx: Transaction<Database>,
  dueBy: Date,
  options: DeliverOptions,
  backoff: BackoffPolicy,
): Promise<'sent' | 'deferred' | 'failed' | 'none'> {
  const row = await lockNextDueMail(trx, dueBy);
  // The query already filters on sent_at, under the lock; the check is repeated so the guarantee does not
  // hang on a WHERE clause someone might edit.
  if (!row || row.sent_at !== null) return 'none';
  try {
    const info = await options.transport.sendMail(toNodemailerMessage(row, options.from));
    await markMailSent(trx, row.id, info.response ?? 'accepted');
    return 'sent';
  } catch (error) {
    const attempts = row.attempts + 1;
    const giveUp = isPermanentRefusal(error) || attempts >= backoff.maxAttempts;
    await recordMailFailure(trx, row.id, describeError(error), giveUp ? null : computeRetryDelayMs(attempts, backoff));
    return giveUp ? 'failed' : 'deferred';
  }
}

function toNodemailerMessage(row: MailOutboxRow, from: string) {
  return {
    from,
    to: row.to_address,
    subject: row.subject,
    text: row.text_body,
    html: row.html_body,
    messageId: row.message_id,
    headers: { ...row.headers, 'X-Sumpwise-Kind': row.kind },
  };
}

// Only a 5xx answer about the recipient is final; a 5xx about authentication or the relay's own setup is
// our configuration problem, and giving up would lose every message until someone noticed.
function isPermanentRefusal(error: unknown): boolean {
  const e = error as { code?: string; responseCode?: number } | null;
  return e?.code === 'EENVELOPE' && typeof e.responseCode === 'number' && e.responseCode >= 500 && e.responseCode < 600;
}

function describeError(error: unknown): string {
  if (error instanceof Error) {
    const code = (error as { code?: string }).code;
    return code ? `${code}: ${error.message}` : error.message;
  }
  return String(error);
}
