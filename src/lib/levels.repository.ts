/**
 * The level ranking in SQL, for the repositories that pick or sort by the worst finding. Built from LEVELS, so
 * the database ranks exactly as levelRank does: steady 0, watch 1, act 2. The interval calls' urgency likewise.
 */
import { sql, type RawBuilder } from 'kysely';
import { CALLS_BY_URGENCY, LEVELS } from './levels';

/** `case <column> when 'watch' then 1 when 'act' then 2 else 0 end`: a findings level column's rank. */
export function levelRankSql(column: string): RawBuilder<number> {
  const whens = LEVELS.flatMap((level, rank) =>
    rank === 0 ? [] : [sql`when ${sql.lit(level)} then ${sql.lit(rank)}`],
  );
  return sql<number>`case ${sql.ref(column)} ${sql.join(whens, sql` `)} else 0 end`;
}

/** `case <column> when 'fix-first' then 0 … when 'stretch' then 3 end`: an interval call column's urgency, most urgent 0. */
export function callUrgencySql(column: string): RawBuilder<number> {
  const whens = CALLS_BY_URGENCY.map((call, rank) => sql`when ${sql.lit(call)} then ${sql.lit(rank)}`);
  return sql<number>`case ${sql.ref(column)} ${sql.join(whens, sql` `)} end`;
}
