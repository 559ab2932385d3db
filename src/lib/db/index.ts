import type { Kysely } from 'kysely';
import { getConfig } from '../config';
import type { Database } from './database';
import { createDb } from './db';

// The one process-wide pool, for routes and services' callers. Domain code never imports this: services
// take `db` as their first argument.
let instance: Kysely<Database> | undefined;

/** The app's shared Kysely instance, created on first use from DATABASE_URL. */
export function getDb(): Kysely<Database> {
  instance ??= createDb(getConfig().DATABASE_URL, { max: getConfig().DATABASE_POOL_SIZE });
  return instance;
}

export type { Database } from './database';
