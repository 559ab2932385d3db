import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { sql, type Kysely } from 'kysely';
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';
import { addMember, makeCrew, makeMachine, makeUser } from './factories';
import { TEST_DATABASE, openTestDb, truncateAll } from './test-database';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const dbSh = path.join(root, 'scripts/db.sh');
const restoredName = `${TEST_DATABASE.name}_restored`;

/** Row count of every public table, as a map. */
async function countEveryTable(db: Kysely<any>): Promise<Record<string, number>> {
  const { rows } = await sql<{
    tablename: string;
  }>`select tablename from pg_tables where schemaname = 'public' order by tablename`.execute(db);
  const counts: Record<string, number> = {};
  for (const { tablename } of rows) {
    counts[tablename] = Number(
      (await sql<{ n: number }>`select count(*)::int as n from ${sql.table(tablename)}`.execute(db)).rows[0]!.n,
    );
  }
  return counts;
}

describe('backup and restore (scripts/db.sh backup / restore)', () => {
  const db: Kysely<Database> = openTestDb();
  const dir = mkdtempSync(path.join(os.tmpdir(), 'sumpwise-backup-'));
  afterAll(async () => {
    await db.destroy();
    rmSync(dir, { recursive: true, force: true });
    execFileSync('bash', [dbSh, 'drop-db', restoredName], { stdio: 'ignore' });
  });
  beforeEach(async () => {
    await truncateAll(db);
  });

  test('a dump restored into an empty database holds every record', async () => {
    const user = await makeUser(db);
    const crew = await makeCrew(db, 'Backup crew');
    await addMember(db, crew.id, user.id, 'lead');
    const machine = await makeMachine(db, crew.id, user.id, { name: 'Restored 650' } as never);
    const before = await countEveryTable(db);
    expect(before.machines).toBe(1);

    const file = path.join(dir, 'sumpwise.dump');
    execFileSync('bash', [dbSh, 'backup', file, TEST_DATABASE.name], { stdio: 'ignore' });
    execFileSync('bash', [dbSh, 'drop-db', restoredName], { stdio: 'ignore' });
    execFileSync('bash', [dbSh, 'restore', file, restoredName], { stdio: 'ignore' });

    const restored = createDb(TEST_DATABASE.url().replace(/\/[^/]+$/, `/${restoredName}`), { max: 1 });
    try {
      expect(await countEveryTable(restored)).toEqual(before);
      const row = await restored.selectFrom('machines').select(['id', 'name', 'crew_id']).executeTakeFirstOrThrow();
      expect(row).toEqual({ id: machine.id, name: 'Restored 650', crew_id: crew.id });
    } finally {
      await restored.destroy();
    }
  });

  test('restore refuses a database that already has tables', () => {
    const file = path.join(dir, 'again.dump');
    execFileSync('bash', [dbSh, 'backup', file, TEST_DATABASE.name], { stdio: 'ignore' });
    expect(() => execFileSync('bash', [dbSh, 'restore', file, TEST_DATABASE.name], { stdio: 'pipe' })).toThrow(
      /not empty/,
    );
  });
});
