import { dropEmbeddedDatabase, migrateToLatest, recreateEmbeddedDatabase } from '../../scripts/lib/database';
import { TEST_DATABASE } from './test-database';

/** Starts the project's PostgreSQL, recreates the test database and migrates it once for all files. */
export default async function setup(): Promise<() => void> {
  // One database per run (the workers inherit this variable), dropped at the end.
  process.env.SUMPWISE_TEST_DB ??= `sumpwise_test_${process.pid}`;
  recreateEmbeddedDatabase(TEST_DATABASE.name);
  await migrateToLatest(TEST_DATABASE.url(), false);
  process.env.DATABASE_URL = TEST_DATABASE.url();
  return () => dropEmbeddedDatabase(TEST_DATABASE.name);
}
