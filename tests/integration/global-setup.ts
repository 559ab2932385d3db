import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createDb } from '~/lib/db/db';
import { assertMigrated, createMigrator } from '~/lib/db/migrator';
import { TEST_DATABASE } from './test-database';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

/** Starts the project's PostgreSQL, recreates the test database and migrates it once for all files. */
export default async function setup(): Promise<() => void> {
  // One database per run (the workers inherit this variable), dropped at the end.
  process.env.SUMPWISE_TEST_DB ??= `sumpwise_test_${process.pid}`;
  execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'start'], { stdio: 'inherit' });
  execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'drop-db', TEST_DATABASE.name], { stdio: 'inherit' });
  execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'ensure-db', TEST_DATABASE.name], { stdio: 'inherit' });
  const db = createDb(TEST_DATABASE.url(), { max: 2 });
  try {
    assertMigrated(await createMigrator(db, path.join(root, 'migrations')).migrateToLatest());
  } finally {
    await db.destroy();
  }
  process.env.DATABASE_URL = TEST_DATABASE.url();
  return () => {
    execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'drop-db', TEST_DATABASE.name], { stdio: 'ignore' });
  };
}
