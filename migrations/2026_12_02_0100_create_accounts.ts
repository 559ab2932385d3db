import { sql, type Kysely } from 'kysely';

// Users, Lucia sessions, crews and crew membership: the unit of sharing every other record hangs from.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('users')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('email_verified_at', 'timestamptz')
    .addColumn('password_hash', 'text', (c) => c.notNull())
    .addColumn('display_name', 'text', (c) => c.notNull())
    .addColumn('distance_unit', 'text', (c) =>
      c
        .notNull()
        .defaultTo('mi')
        .check(sql`distance_unit in ('mi', 'km')`),
    )
    .addColumn('length_unit', 'text', (c) =>
      c
        .notNull()
        .defaultTo('in')
        .check(sql`length_unit in ('in', 'mm')`),
    )
    .addColumn('temperature_unit', 'text', (c) =>
      c
        .notNull()
        .defaultTo('F')
        .check(sql`temperature_unit in ('F', 'C')`),
    )
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await sql`create unique index users_email_lower_key on users (lower(email))`.execute(db);

  await db.schema
    .createTable('crews')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .createTable('crew_members')
    .addColumn('crew_id', 'uuid', (c) => c.notNull().references('crews.id').onDelete('cascade'))
    .addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('role', 'text', (c) => c.notNull().check(sql`role in ('lead', 'mechanic', 'rider')`))
    .addColumn('joined_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('crew_members_pkey', ['crew_id', 'user_id'])
    .execute();
  await db.schema.createIndex('crew_members_user_idx').on('crew_members').column('user_id').execute();

  // Lucia's table shape (id text, user_id text, expires_at timestamptz) plus the crew the session works in.
  await db.schema
    .createTable('sessions')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('current_crew_id', 'uuid', (c) => c.references('crews.id').onDelete('set null'))
    .execute();
  await db.schema.createIndex('sessions_user_idx').on('sessions').column('user_id').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('sessions').execute();
  await db.schema.dropTable('crew_members').execute();
  await db.schema.dropTable('crews').execute();
  await db.schema.dropTable('users').execute();
}
