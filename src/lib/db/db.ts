import { Kysely, PostgresDialect } from 'kysely';
import pg from 'pg';
import { CopyingClient } from './copy';
import type { Database } from './database';
import './embedded-password';

// `date` columns stay 'YYYY-MM-DD' text: a calendar day has no time zone to shift it.
pg.types.setTypeParser(1082, (value: string) => value);
// bigint/bigserial ids fit in a JS number for any realistic row count; counts come back as numbers.
pg.types.setTypeParser(20, (value: string) => Number(value));

/** A Kysely instance over a pg pool; the caller owns it and must `destroy()` it. */
export function createDb(connectionString: string, options: { max?: number } = {}): Kysely<Database> {
  const pool = new pg.Pool({
    connectionString,
    max: options.max ?? 10,
    connectionTimeoutMillis: 5_000,
    idleTimeoutMillis: 30_000,
    // pg's client that also runs COPY FROM STDIN for copyRows (copy.ts), on the caller's connection.
    Client: CopyingClient,
  });
  // An idle client losing its server (a restart) must not crash the process; the pool drops it. A client
  // whose connection is killed mid-query also emits 'error' after the query has failed: swallow that too.
  pool.on('error', () => {});
  pool.on('connect', (client) => { client.on('error', () => {}); });
  return new Kysely<Database>({ dialect: new PostgresDialect({ pool }) });
}
