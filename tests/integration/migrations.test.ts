import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { readdirSync } from 'node:fs';
import { sql } from 'kysely';
import { afterAll, describe, expect, test } from 'vitest';
import { createDb } from '~/lib/db/db';
import { assertMigrated, createMigrator } from '~/lib/db/migrator';
import { dropEmbeddedDatabase, recreateEmbeddedDatabase } from '../../scripts/lib/database';
import { TEST_DATABASE } from './test-database';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const folder = path.join(root, 'migrations');
const scratch = `${TEST_DATABASE.name}_migrations`;

describe('migrations', () => {
  const db = createDb(recreateEmbeddedDatabase(scratch), { max: 2 });
  afterAll(async () => {
    await db.destroy();
    dropEmbeddedDatabase(scratch);
  });

  const tableCount = async () =>
    Number(
      (
        await sql<{
          n: string;
        }>`select count(*)::int as n from pg_tables where schemaname = 'public' and tablename not like 'kysely_%'`.execute(
          db,
        )
      ).rows[0]!.n,
    );

  test('every up, every down and every up again on an empty database', async () => {
    const files = readdirSync(folder).filter((f) => /^\d{4}_\d{2}_\d{2}_\d{4}_[a-z0-9_]+\.ts$/.test(f));
    expect(files.length).toBeGreaterThan(0);
    expect(readdirSync(folder).filter((f) => f.endsWith('.ts'))).toEqual(files); // naming rule: YYYY_MM_DD_HHMM_verb_noun.ts
    const migrator = createMigrator(db, folder);

    const up = await migrator.migrateToLatest();
    assertMigrated(up);
    expect(up.results?.map((r) => r.migrationName)).toEqual(files.map((f) => f.replace(/\.ts$/, '')));
    const afterUp = await tableCount();
    expect(afterUp).toBeGreaterThan(5);

    for (let i = 0; i < files.length; i++) assertMigrated(await migrator.migrateDown());
    expect(await tableCount()).toBe(0);

    assertMigrated(await migrator.migrateToLatest());
    expect(await tableCount()).toBe(afterUp);
  });
});
