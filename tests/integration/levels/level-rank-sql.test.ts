import { afterAll, describe, expect, test } from 'vitest';
import { sql } from 'kysely';
import { openTestDb } from '../test-database';
import { CALLS_BY_URGENCY, LEVELS, levelRank } from '~/lib/levels';
import { callUrgencySql, levelRankSql } from '~/lib/levels.repository';

const db = openTestDb();
afterAll(() => db.destroy());

describe('levelRankSql', () => {
  // The database must rank a level exactly as the screens do, or the overview sorts one way and the cards another.
  test.each(LEVELS.map((l) => [l, levelRank(l)] as const))(
    'PostgreSQL ranks %s as %i, as levelRank does',
    async (level, rank) => {
      const { rows } = await sql<{
        rank: number;
      }>`select ${levelRankSql('t.level')} as rank from (select ${level}::text as level) t`.execute(db);
      expect(Number(rows[0]!.rank)).toBe(rank);
    },
  );

  test('the worst of several levels is the max of their ranks', async () => {
    const { rows } = await sql<{ worst: number }>`
      select max(${levelRankSql('t.level')}) as worst from (values ('watch'), ('steady'), ('act'), ('watch')) as t(level)`.execute(
      db,
    );
    expect(Number(rows[0]!.worst)).toBe(2);
  });
});

describe('callUrgencySql', () => {
  // The overview sorts by call from most to least urgent: fix-first, shorten, hold, stretch (common practice).
  test.each([
    ['fix-first', 0],
    ['shorten', 1],
    ['hold', 2],
    ['stretch', 3],
  ] as const)('PostgreSQL ranks %s as %i', async (call, rank) => {
    const { rows } = await sql<{
      rank: number;
    }>`select ${callUrgencySql('t.call')} as rank from (select ${call}::text as call) t`.execute(db);
    expect(Number(rows[0]!.rank)).toBe(rank);
    expect(CALLS_BY_URGENCY.indexOf(call)).toBe(rank);
  });
});
