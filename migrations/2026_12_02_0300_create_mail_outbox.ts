import { sql, type Kysely } from 'kysely';

// The mail outbox: every outgoing message is a row written in the same transaction as the business change
// that caused it, so a rolled-back sign-up sends nothing. The worker delivers rows and marks them sent.
// dev_mailbox is where the local fake relay (scripts/mail-relay.ts) keeps what it received; production
// never writes it, it only exists so the demo and the tests can read the mail that was "sent".
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('mail_outbox')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('idempotency_key', 'text', (c) => c.notNull().unique())
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('to_address', 'text', (c) => c.notNull())
    .addColumn('subject', 'text', (c) => c.notNull())
    .addColumn('text_body', 'text', (c) => c.notNull())
    .addColumn('html_body', 'text', (c) => c.notNull())
    .addColumn('headers', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .addColumn('message_id', 'text', (c) => c.notNull())
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('last_error', 'text')
    .addColumn('last_attempt_at', 'timestamptz')
    .addColumn('next_attempt_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('sent_at', 'timestamptz')
    // Set when the relay refused the message for good (a 5xx answer) or the attempts ran out: kept for the
    // record, never retried.
    .addColumn('failed_at', 'timestamptz')
    .addColumn('relay_response', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  // The worker's only query: unsent rows that are due, oldest first. A partial index stays small because
  // finished rows leave it.
  await sql`create index mail_outbox_due_idx on mail_outbox (next_attempt_at, created_at) where sent_at is null and failed_at is null`.execute(
    db,
  );

  await db.schema
    .createTable('dev_mailbox')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('message_id', 'text')
    .addColumn('envelope_from', 'text')
    .addColumn('envelope_to', 'text', (c) => c.notNull())
    .addColumn('from_header', 'text')
    .addColumn('to_header', 'text')
    .addColumn('subject', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('text_body', 'text')
    .addColumn('html_body', 'text')
    .addColumn('raw', 'text', (c) => c.notNull())
    .addColumn('received_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('dev_mailbox_received_idx').on('dev_mailbox').column('received_at').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('dev_mailbox').execute();
  await db.schema.dropTable('mail_outbox').execute();
}
