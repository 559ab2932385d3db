import { sql, type Kysely } from 'kysely';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';

/** The integration tests' own database on the project's server: never the demo data. */
export const TEST_DATABASE = {
  /** Set per run by the global setup, so two runs at once never share (or drop) each other's database. */
  get name(): string {
    return process.env.SUMPWISE_TEST_DB ?? 'sumpwise_test';
  },
  url(): string {
    const port = process.env.SUMPWISE_PG_PORT ?? '54329';
    return `postgres://sumpwise@127.0.0.1:${port}/${this.name}`;
  },
};

/** A pool on the test database; close it in afterAll. */
export function openTestDb(): Kysely<Database> {
  return createDb(TEST_DATABASE.url(), { max: 5 });
}

/** Empties every table but the migration bookkeeping, so each test starts from nothing. */
export async function truncateAll(db: Kysely<any>): Promise<void> {
  const { rows } = await sql<{ tablename: string }>`
    select tablename from pg_tables
    where schemaname = 'public' and tablename not like 'kysely_%'`.execute(db);
  if (rows.length === 0) return;
  const list = rows.map((r) => `"public"."${r.tablename}"`).join(', ');
  await sql.raw(`truncate ${list} restart identity cascade`).execute(db);
}

/** `db` with every query sent through it recorded (by kind) as it goes: how many round trips a piece of code makes. */
export function countingQueries(db: Kysely<Database>): { counted: Kysely<Database>; sent: string[] } {
  const sent: string[] = [];
  const counted = db.withPlugin({
    transformQuery: (args) => {
      sent.push(args.node.kind);
      return args.node;
    },
    transformResult: async (args) => args.result,
  });
  return { counted, sent };
}
