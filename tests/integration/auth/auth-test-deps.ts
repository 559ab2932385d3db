import pg from 'pg';
import { sql, type Kysely } from 'kysely';
import type { Database } from '~/lib/db/database';
import type { AuthDeps } from '~/lib/auth/auth.service';
import { createLucia } from '~/lib/auth/session';
import { createRateLimits } from '~/lib/rate-limit/rate-limits';
import { TEST_DATABASE } from '../test-database';

/** Account-service dependencies on the test database, with the production rate-limit rules. */
export function makeAuthDeps(db: Kysely<Database>): { deps: AuthDeps; pool: pg.Pool } {
  const pool = new pg.Pool({ connectionString: TEST_DATABASE.url(), max: 3 });
  return {
    deps: {
      db,
      lucia: createLucia(pool, { secure: false }),
      limits: createRateLimits(pool),
      publicUrl: 'http://127.0.0.1:4321',
    },
    pool,
  };
}

/** Messages waiting in the outbox for one address, newest first. */
export async function outboxFor(db: Kysely<Database>, to: string) {
  const { rows } = await sql<{ kind: string; subject: string; text_body: string; html_body: string }>`
    select kind, subject, text_body, html_body from mail_outbox where to_address = ${to} order by created_at desc`.execute(
    db,
  );
  return rows;
}

/** The first http(s) link in a message's text. */
export function firstLink(text: string): string {
  const m = /https?:\/\/\S+/.exec(text);
  if (!m) throw new Error(`no link in message:\n${text}`);
  return m[0];
}
