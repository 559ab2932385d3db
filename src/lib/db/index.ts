import type { Kysely } from 'kysely';
import type pg from 'pg';
import { getConfig } from '../config';
import type { Database } from './database';
import { createDb, createPool } from './db';

// The one process-wide pool, for routes and services' callers: Kysely, the session store (Lucia's adapter) and
// the rate limiter all draw from it. Domain code never imports this: services take `db` as their first argument.
let pool: pg.Pool | undefined;
let instance: Kysely<Database> | undefined;

/**
 * Connections the app process may hold: what Kysely (20) and the former separate auth pool (5) held
 * together, so sharing one pool keeps the server's connection budget where it was (common practice to
 * size a pool to the work, no published source for these figures).
 */
const APP_POOL_MAX = 25;

/** The app's shared pg pool, created on first use from DATABASE_URL. */
export function getPool(): pg.Pool {
  pool ??= createPool(getConfig().DATABASE_URL, { max: APP_POOL_MAX });
  return pool;
}

/** The app's shared Kysely instance over {@link getPool}. */
export function getDb(): Kysely<Database> {
  instance ??= createDb(getPool());
  return instance;
}

export type { Database } from './database';
