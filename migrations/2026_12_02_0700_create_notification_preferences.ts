import { sql, type Kysely } from 'kysely';

// E-mail alerts and reminders. Three tables:
// - notification_preferences: per user, crew and kind of message, how it is delivered (immediately, in the
//   daily digest, or not at all). No row means the kind's default.
// - alert_deliveries: one row per logical alert a user was given (its dedupe key, e.g.
//   reminder:sample-due:<machine>:<date>:<user>), written in the same transaction as the outbox message or
//   the digest item, so a re-run job or a retried import never alerts anyone twice, whatever the outbox keeps.
// - alert_digest_items: alerts waiting for the user's daily digest; the digest job marks them when it queues
//   the digest message, in one transaction.
export async function up(db: Kysely<any>): Promise<void> {
  const kinds = sql`kind in ('import_findings', 'sample_due', 'shipped_overdue', 'invitation_pending')`;
  await db.schema
    .createTable('notification_preferences')
    .addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('crew_id', 'uuid', (c) => c.notNull().references('crews.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull().check(kinds))
    .addColumn('delivery', 'text', (c) => c.notNull().check(sql`delivery in ('immediate', 'digest', 'off')`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('notification_preferences_pkey', ['user_id', 'crew_id', 'kind'])
    .execute();

  await db.schema
    .createTable('alert_deliveries')
    .addColumn('dedupe_key', 'text', (c) => c.primaryKey())
    .addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('crew_id', 'uuid', (c) => c.notNull().references('crews.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull().check(kinds))
    .addColumn('delivery', 'text', (c) => c.notNull().check(sql`delivery in ('immediate', 'digest')`))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .createTable('alert_digest_items')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('dedupe_key', 'text', (c) =>
      c.notNull().unique().references('alert_deliveries.dedupe_key').onDelete('cascade'),
    )
    .addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('crew_id', 'uuid', (c) => c.notNull().references('crews.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull().check(kinds))
    .addColumn('title', 'text', (c) => c.notNull())
    .addColumn('lines', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('digested_at', 'timestamptz')
    .addColumn('digest_key', 'text')
    .execute();
  await sql`create index alert_digest_items_pending_idx on alert_digest_items (user_id, created_at) where digested_at is null`.execute(
    db,
  );
  // The import alert finds the samples an import wrote through their readings, inside the import's
  // transaction: without this index that is a scan of every reading ever imported.
  await sql`create index readings_lab_import_idx on readings (lab_import_id)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop index if exists readings_lab_import_idx`.execute(db);
  await db.schema.dropTable('alert_digest_items').execute();
  await db.schema.dropTable('alert_deliveries').execute();
  await db.schema.dropTable('notification_preferences').execute();
}
