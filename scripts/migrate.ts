// Usage: tsx scripts/migrate.ts latest|down|reset  — applies migrations to DATABASE_URL.
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createDb } from '../src/lib/db/db';
import { assertMigrated, createMigrator } from '../src/lib/db/migrator';
import { readConfig } from '../src/lib/config';
import { recomputeStaleMachines } from '../src/lib/findings/findings.service';

const folder = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'migrations');
const command = process.argv[2] ?? 'latest';
const config = readConfig();
const db = createDb(config.DATABASE_URL, { max: 2 });
try {
  const migrator = createMigrator(db, folder);
  const result =
    command === 'latest'
      ? await migrator.migrateToLatest()
      : command === 'down'
        ? await migrator.migrateDown()
        : (() => {
            throw new Error(`unknown command ${command}; use latest or down`);
          })();
  for (const r of result.results ?? []) console.log(`[migrate] ${r.direction} ${r.migrationName}: ${r.status}`);
  assertMigrated(result);
  if (!result.results?.length) console.log('[migrate] nothing to do');
  // Stored findings and calls follow the engine: machines an older engine judged are judged again.
  if (command === 'latest') await recomputeStaleMachines(db, console.log);
} catch (error) {
  console.error(`[migrate] ${error instanceof Error ? error.message : String(error)}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
