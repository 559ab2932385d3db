import { readdir } from 'node:fs/promises';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { Migrator, type Kysely, type Migration, type MigrationProvider, type MigrationResultSet } from 'kysely';

const MIGRATION_FILE = /^\d{4}_\d{2}_\d{2}_\d{4}_[a-z0-9_]+\.ts$/;

/** Reads migrations/ with this module's own dynamic import, so tsx and Vitest both load the .ts files. */
class FolderMigrationProvider implements MigrationProvider {
  constructor(private readonly folder: string) {}

  async getMigrations(): Promise<Record<string, Migration>> {
    const migrations: Record<string, Migration> = {};
    for (const file of (await readdir(this.folder)).sort()) {
      if (!MIGRATION_FILE.test(file)) continue;
      const mod = (await import(
        /* @vite-ignore */ pathToFileURL(path.join(this.folder, file)).href
      )) as Partial<Migration>;
      if (typeof mod.up !== 'function' || typeof mod.down !== 'function') {
        throw new Error(`migration ${file} must export both up and down`);
      }
      migrations[file.replace(/\.ts$/, '')] = { up: mod.up, down: mod.down };
    }
    return migrations;
  }
}

/** A migrator over the files in migrations/ (YYYY_MM_DD_HHMM_verb_noun.ts, each with up and down). */
export function createMigrator(db: Kysely<any>, migrationFolder: string): Migrator {
  return new Migrator({ db, provider: new FolderMigrationProvider(migrationFolder) });
}

/** Throws with the failing migration's name when a run did not succeed. */
export function assertMigrated(result: MigrationResultSet): void {
  if (result.error) {
    const failed = result.results?.find((r) => r.status === 'Error');
    const reason = result.error instanceof Error ? result.error.message : String(result.error);
    throw new Error(`migration ${failed?.migrationName ?? '(unknown)'} failed: ${reason}`);
  }
}
