import { sql, type Kysely } from 'kysely';

// The IANA zone a user reads times in. Null until the first sign-up or sign-in from a browser sets it (or the
// user chooses one on the account page); screens show UTC meanwhile. The app validates the name against the
// runtime's zone list; the check here only keeps junk and huge strings out.
const UP = [
  `alter table users add column time_zone text
     check (time_zone is null or (length(time_zone) between 1 and 64 and time_zone ~ '^[A-Za-z0-9_+/-]+$'))`,
];

const DOWN = [`alter table users drop column time_zone`];

export async function up(db: Kysely<any>): Promise<void> {
  for (const statement of UP) await sql.raw(statement).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const statement of DOWN) await sql.raw(statement).execute(db);
}
