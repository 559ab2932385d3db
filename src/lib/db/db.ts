import { Kysely, PostgresDialect } from 'kysely';
import pg from 'pg';
import { CopyingClient } from './copy';
import type { Database } from './database';
import './embedded-password';

// `date` columns stay 'YYYY-MM-DD' text: a calendar day has no time zone to shift it.
pg.types.setTypeParser(1082, (value: string) => value);
// bigint/bigserial ids fit in a JS number for any realistic row count; counts come back as numbers.
pg.types.setTypeParser(20, (value: string) => Number(value));

/** A pg pool with the app's timeouts and error handling; the caller owns it and must `end()` it. */
export function createPool(connectionString: string, options: { max?: number } = {}): pg.Pool {
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
  pool.on('connect', (client) => {
    client.on('error', () => {});
  });
  return pool;
}

/**
 * A Kysely instance over a new pool (from a connection string) or over a pool the process already has (so
 * the session store and the rate limiter share its connections). `destroy()` ends the pool either way.
 */
export function createDb(source: string | pg.Pool, options: { max?: number } = {}): Kysely<Database> {
  const pool = typeof source === 'string' ? createPool(source, options) : source;
  return new Kysely<Database>({ dialect: new PostgresDialect({ pool }) });
}
