import type { Kysely } from 'kysely';
import type pg from 'pg';
import { getConfig } from '../config';
import type { Database } from './database';
import { createDb, createPool } from './db';

// The one process-wide pool, for routes and services' callers: Kysely, the session store (Lucia's adapter) and
// the rate limiter all draw from it, so an app process holds at most DATABASE_POOL_SIZE connections (the sum
// against max_connections is in the README). Domain code never imports this: services take `db` as their first argument.
let pool: pg.Pool | undefined;
let instance: Kysely<Database> | undefined;

/** The app's shared pg pool, created on first use from DATABASE_URL with DATABASE_POOL_SIZE connections at most. */
export function getPool(): pg.Pool {
  pool ??= createPool(getConfig().DATABASE_URL, { max: getConfig().DATABASE_POOL_SIZE });
  return pool;
}

/** The app's shared Kysely instance over {@link getPool}. */
export function getDb(): Kysely<Database> {
  instance ??= createDb(getPool());
  return instance;
}

export type { Database } from './database';
