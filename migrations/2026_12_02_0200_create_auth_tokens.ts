import { sql, type Kysely } from 'kysely';

// Single-use tokens (e-mail verification, password reset), crew invitations, the security audit log and
// the rate limiter's counters. Tokens are stored only as SHA-256 hashes, so a read of the database does
// not hand out working links.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('auth_tokens')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('purpose', 'text', (c) => c.notNull().check(sql`purpose in ('verify_email', 'reset_password')`))
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('used_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('auth_tokens_user_idx').on('auth_tokens').columns(['user_id', 'purpose']).execute();

  await db.schema
    .createTable('crew_invitations')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('crew_id', 'uuid', (c) => c.notNull().references('crews.id').onDelete('cascade'))
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('role', 'text', (c) => c.notNull().check(sql`role in ('lead', 'mechanic', 'rider')`))
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('invited_by', 'text', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('accepted_at', 'timestamptz')
    .addColumn('accepted_by', 'text', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('revoked_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('crew_invitations_crew_idx').on('crew_invitations').column('crew_id').execute();

  await db.schema
    .createTable('audit_events')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('crew_id', 'uuid', (c) => c.references('crews.id').onDelete('cascade'))
    .addColumn('actor_user_id', 'text', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('subject_user_id', 'text', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('detail', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .addColumn('ip', 'text')
    .addColumn('at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('audit_events_crew_idx').on('audit_events').columns(['crew_id', 'at']).execute();
  await db.schema
    .createIndex('audit_events_subject_idx')
    .on('audit_events')
    .columns(['subject_user_id', 'at'])
    .execute();

  // The shape rate-limiter-flexible's RateLimiterPostgres expects (created here so the app never runs DDL).
  await sql`create table rate_limits (key varchar(255) primary key, points integer not null default 0, expire bigint)`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('rate_limits').execute();
  await db.schema.dropTable('audit_events').execute();
  await db.schema.dropTable('crew_invitations').execute();
  await db.schema.dropTable('auth_tokens').execute();
}
