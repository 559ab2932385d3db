import { sql } from 'kysely';
import { afterAll, describe, expect, test } from 'vitest';
import { copyRows, encodeCopyValue } from '~/lib/db/copy';
import { openTestDb } from '../test-database';

const db = openTestDb();
afterAll(() => db.destroy());

// COPY's text format: PostgreSQL documentation, "COPY", section "Text Format".
describe('encodeCopyValue', () => {
  test.each([
    [null, '\\N'],
    [12.5, '12.5'],
    [1e-7, '1e-7'],
    ['plain', 'plain'],
    ['tab\there', 'tab\\there'],
    ['line\nbreak\r', 'line\\nbreak\\r'],
    ['back\\slash', 'back\\\\slash'],
    ['\\N', '\\\\N'],
  ] as const)('%j → %j', (value, expected) => {
    expect(encodeCopyValue(value)).toBe(expected);
  });

  test('refuses a number COPY cannot store faithfully', () => {
    expect(() => encodeCopyValue(Number.NaN)).toThrow(/COPY cannot write/);
  });
});

describe('copyRows', () => {
  // One connection for the temporary table: a transaction pins it.
  test('rows with awkward text arrive exactly, and go with a rolled-back transaction', async () => {
    const labels = ['tab\tand\nnewline', 'back\\slash \\N', 'ünïcödé — “quotes”', null];
    await expect(
      db.transaction().execute(async (trx) => {
        await sql`create temporary table t_copy (id int primary key, label text, figure float8) on commit drop`.execute(
          trx,
        );
        const n = await copyRows(
          trx,
          't_copy',
          ['id', 'label', 'figure'],
          labels.map((label, i) => [i, label, i === 3 ? null : i / 3]),
        );
        expect(n).toBe(4);
        const rows = await sql<{
          id: number;
          label: string | null;
          figure: number | null;
        }>`select id, label, figure from t_copy order by id`.execute(trx);
        expect(rows.rows).toEqual(labels.map((label, i) => ({ id: i, label, figure: i === 3 ? null : i / 3 })));
        await sql`create table copy_kept (id int)`.execute(trx);
        await copyRows(trx, 'copy_kept', ['id'], [[1], [2]]);
        throw new Error('roll back');
      }),
    ).rejects.toThrow('roll back');
    const kept = await sql<{
      n: number;
    }>`select count(*)::int as n from pg_tables where tablename = 'copy_kept'`.execute(db);
    expect(kept.rows[0]!.n).toBe(0);
  });

  test('a row the table refuses fails the COPY and the transaction, writing nothing', async () => {
    await sql`create table if not exists copy_refuse (id int primary key)`.execute(db);
    await sql`truncate copy_refuse`.execute(db);
    await expect(
      db.transaction().execute((trx) => copyRows(trx, 'copy_refuse', ['id'], [[1], [2], [1]])),
    ).rejects.toThrow(/duplicate key/);
    const n = await sql<{ n: number }>`select count(*)::int as n from copy_refuse`.execute(db);
    expect(n.rows[0]!.n).toBe(0);
    await sql`drop table copy_refuse`.execute(db);
  });

  test('many rows stream through in chunks', async () => {
    const count = await db.transaction().execute(async (trx) => {
      await sql`create temporary table t_many (id int, label text) on commit drop`.execute(trx);
      function* rows() {
        for (let i = 0; i < 50_000; i += 1) yield [i, `label ${i}`];
      }
      await copyRows(trx, 't_many', ['id', 'label'], rows());
      return (
        await sql<{ n: number; s: number }>`select count(*)::int as n, sum(id)::float8 as s from t_many`.execute(trx)
      ).rows[0]!;
    });
    expect(count).toEqual({ n: 50_000, s: (49_999 * 50_000) / 2 });
  });

  test('names that are not plain identifiers are refused before anything is sent', async () => {
    await expect(copyRows(db, 'readings; drop table users', ['id'], [])).rejects.toThrow(/plain identifier/);
    await expect(copyRows(db, 'readings', ['value) from stdin; --'], [])).rejects.toThrow(/plain identifier/);
  });
});
