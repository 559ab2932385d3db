// Database set-up shared by the start, seed and test scripts: the embedded server, a database on it,
// migrations, and a reachability check with one readable line when it fails.
import path from 'node:path';
import pg from 'pg';
import { createDb } from '../../src/lib/db/db';
import { useEmbeddedPassword } from '../../src/lib/db/embedded-password';
import { assertMigrated, createMigrator } from '../../src/lib/db/migrator';
import { recomputeStaleMachines } from '../../src/lib/findings/findings.service';
import { ROOT, capture, run } from './processes';

/** Starts the project's own PostgreSQL (nothing to do when it runs already). */
export function startEmbeddedServer(): void {
  if (run('bash', [path.join(ROOT, 'scripts/db.sh'), 'start']) !== 0)
    throw new Error('the embedded PostgreSQL did not start (see above)');
  // A first start writes the password file after this process read it at import: read it again.
  useEmbeddedPassword(ROOT);
}

/** Starts the project's own PostgreSQL and makes sure database `name` exists; returns its URL. */
export function ensureEmbeddedDatabase(name: string): string {
  startEmbeddedServer();
  if (run('bash', [path.join(ROOT, 'scripts/db.sh'), 'ensure-db', name]) !== 0)
    throw new Error(`could not create database ${name}`);
  return capture('bash', [path.join(ROOT, 'scripts/db.sh'), 'url', name]);
}

/** Drops database `name` on the embedded server (no error when it does not exist). */
export function dropEmbeddedDatabase(name: string): void {
  run('bash', [path.join(ROOT, 'scripts/db.sh'), 'drop-db', name], { stdio: ['ignore', 'ignore', 'inherit'] });
}

/** Recreates database `name` empty on the embedded server (starting the server first, so the drop can run). */
export function recreateEmbeddedDatabase(name: string): string {
  startEmbeddedServer();
  dropEmbeddedDatabase(name);
  return ensureEmbeddedDatabase(name);
}

/** Connects once; throws one line naming the host, port and cause when the database cannot be reached. */
export async function assertReachable(url: string): Promise<void> {
  const client = new pg.Client({ connectionString: url, connectionTimeoutMillis: 5_000 });
  try {
    await client.connect();
    await client.query('select 1');
  } catch (error) {
    const u = new URL(url);
    const cause = error instanceof Error ? ((error as NodeJS.ErrnoException).code ?? error.message) : String(error);
    throw new Error(
      `cannot reach the database at ${u.hostname}:${u.port || 5432}/${u.pathname.slice(1)} (${cause}): start it, fix DATABASE_URL, or unset DATABASE_URL to use the embedded PostgreSQL`,
    );
  } finally {
    await client.end().catch(() => {});
  }
}

/** Applies every pending migration to the database at `url`. */
export async function migrateToLatest(url: string, log = true): Promise<void> {
  const db = createDb(url, { max: 2 });
  try {
    const result = await createMigrator(db, path.join(ROOT, 'migrations')).migrateToLatest();
    if (log) for (const r of result.results ?? []) console.log(`[migrate] ${r.migrationName}: ${r.status}`);
    assertMigrated(result);
    // Stored findings and calls follow the engine: machines an older engine judged are judged again.
    await recomputeStaleMachines(db, log ? console.log : undefined);
  } finally {
    await db.destroy();
  }
}
