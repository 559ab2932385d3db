import { sql, type Kysely, type Transaction } from 'kysely';
import type { Database, DevMailboxRow, MailOutboxRow } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

/** The NOTIFY channel a committed outbox insert wakes the worker on. */
export const MAIL_OUTBOX_CHANNEL = 'sumpwise_mail_outbox';

/** Inserts an outbox row unless its idempotency key is already there; true when a row was written. */
export async function insertOutboxMail(
  db: Db,
  row: {
    idempotency_key: string;
    kind: string;
    to_address: string;
    subject: string;
    text_body: string;
    html_body: string;
    headers: Record<string, string>;
    message_id: string;
  },
): Promise<boolean> {
  const inserted = await db
    .insertInto('mail_outbox')
    .values({ ...row, headers: JSON.stringify(row.headers) })
    .onConflict((oc) => oc.column('idempotency_key').doNothing())
    .returning('id')
    .executeTakeFirst();
  return inserted !== undefined;
}

/** Queues a wake-up for listening workers; PostgreSQL delivers it only if the transaction commits. */
export async function notifyOutbox(db: Db): Promise<void> {
  await sql`select pg_notify(${MAIL_OUTBOX_CHANNEL}, '')`.execute(db);
}

/** The database clock, so "due" never depends on the worker machine's clock. */
export async function readDatabaseNow(db: Db): Promise<Date> {
  const { rows } = await sql<{ now: Date }>`select now() as now`.execute(db);
  return rows[0]!.now;
}

/** Locks the oldest unsent message due by `dueBy`; rows another worker holds are skipped, not waited for. */
export async function lockNextDueMail(trx: Transaction<Database>, dueBy: Date): Promise<MailOutboxRow | undefined> {
  return trx
    .selectFrom('mail_outbox')
    .selectAll()
    .where('sent_at', 'is', null)
    .where('failed_at', 'is', null)
    .where('next_attempt_at', '<=', dueBy)
    .orderBy('next_attempt_at')
    .orderBy('created_at')
    .limit(1)
    .forUpdate()
    .skipLocked()
    .executeTakeFirst();
}

/** Records that the relay accepted the message. */
export async function markMailSent(trx: Transaction<Database>, id: string, relayResponse: string): Promise<void> {
  await trx
    .updateTable('mail_outbox')
    .set({
      sent_at: sql`now()`,
      last_attempt_at: sql`now()`,
      attempts: sql`attempts + 1`,
      relay_response: relayResponse,
      last_error: null,
    })
    .where('id', '=', id)
    .execute();
}

/** Records a failed attempt: retried after `retryInMs`, or given up for good when `retryInMs` is null. */
export async function recordMailFailure(
  trx: Transaction<Database>,
  id: string,
  error: string,
  retryInMs: number | null,
): Promise<void> {
  await trx
    .updateTable('mail_outbox')
    .set({
      attempts: sql`attempts + 1`,
      last_error: error.slice(0, 2000),
      last_attempt_at: sql`now()`,
      ...(retryInMs === null
        ? { failed_at: sql`now()` }
        : { next_attempt_at: sql`now() + ${retryInMs} * interval '1 millisecond'` }),
    })
    .where('id', '=', id)
    .execute();
}

/** When the next unsent message falls due, or null when nothing is waiting. */
export async function findNextDueAt(db: Db): Promise<Date | null> {
  const row = await db
    .selectFrom('mail_outbox')
    .select((eb) => eb.fn.min('next_attempt_at').as('next'))
    .where('sent_at', 'is', null)
    .where('failed_at', 'is', null)
    .executeTakeFirst();
  return row?.next ?? null;
}

/** Stores one message the local fake relay received. */
export async function insertDevMail(
  db: Db,
  row: {
    message_id: string | null;
    envelope_from: string | null;
    envelope_to: string;
    from_header: string | null;
    to_header: string | null;
    subject: string;
    text_body: string | null;
    html_body: string | null;
    raw: string;
  },
): Promise<number> {
  const { id } = await db.insertInto('dev_mailbox').values(row).returning('id').executeTakeFirstOrThrow();
  return id;
}

export type DevMailSummary = Pick<DevMailboxRow, 'id' | 'envelope_to' | 'to_header' | 'subject' | 'received_at'>;

/** The newest messages of the dev mailbox, newest first. */
export async function listDevMail(db: Db, limit = 200): Promise<DevMailSummary[]> {
  return db
    .selectFrom('dev_mailbox')
    .select(['id', 'envelope_to', 'to_header', 'subject', 'received_at'])
    .orderBy('received_at', 'desc')
    .orderBy('id', 'desc')
    .limit(limit)
    .execute();
}

/** One message of the dev mailbox, or undefined. */
export async function findDevMail(db: Db, id: number): Promise<DevMailboxRow | undefined> {
  return db.selectFrom('dev_mailbox').selectAll().where('id', '=', id).executeTakeFirst();
}
