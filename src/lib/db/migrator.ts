import { promises as fs } from 'node:fs';
import path from 'node:path';
import { FileMigrationProvider, Migrator, type Kysely, type MigrationResultSet } from 'kysely';

/** A migrator over the files in migrations/ (YYYY_MM_DD_HHMM_verb_noun.ts, each with up and down). */
export function createMigrator(db: Kysely<any>, migrationFolder: string): Migrator {
  return new Migrator({
    db,
    provider: new FileMigrationProvider({ fs, path, migrationFolder }),
  });
}

/** Throws with the failing migration's name when a run did not succeed. */
export function assertMigrated(result: MigrationResultSet): void {
  if (result.error) {
    const failed = result.results?.find((r) => r.status === 'Error');
    const reason = result.error instanceof Error ? result.error.message : String(result.error);
    throw new Error(`migration ${failed?.migrationName ?? '(unknown)'} failed: ${reason}`);
  }
}
