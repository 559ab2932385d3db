// A long machine history judged again and stored a run of samples at a time: whichever sample the judging starts
// from (and so wherever the runs begin and end), every sample from there on gets its findings, bands and one
// engine call, the same as when the whole history is judged, and the samples before it are left as they were.
// Invented figures throughout.
import { sql, type Kysely } from 'kysely';
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type { Database } from '~/lib/db/database';
import { JUDGED_BATCH, recomputeMachineFindings } from '~/lib/findings/findings.service';
import { openTestDb, truncateAll } from '../test-database';
import { addSamples, makeCrewWithRoles } from '../trends/decision-fixtures';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

/** Two full runs of samples and part of a third, so that the runs' edges fall inside the history. */
const SAMPLES = 2 * JUDGED_BATCH + 30;
const CLIMB_FROM = SAMPLES - 10;

/** Samples 3,000 km and about two weeks apart: iron and aluminium wander around a steady level, then iron climbs over the last ten. */
function history() {
  return Array.from({ length: SAMPLES }, (_, i) => ({
    drawnOn: new Date(Date.UTC(2010, 0, 1) + i * 15 * 86_400_000).toISOString().slice(0, 10),
    odometer: 3000 * (i + 1),
    distanceOnOil: 3000,
    readings: {
      Fe: i < CLIMB_FROM ? 14 + ((i * 7) % 5) : 20 + (i - CLIMB_FROM) * 6,
      Al: 3 + ((i * 3) % 3),
      Si: 6 + (i % 4),
      KV100: 13 + ((i % 5) - 2) * 0.1,
    },
  }));
}

/** Everything the engine stored for the machine's samples, in a stable order, with the rows' own ids. */
async function stored(dbx: Kysely<Database>, sampleIds: readonly string[]) {
  const position = new Map(sampleIds.map((id, i) => [id, i]));
  const at = (id: string) => position.get(id)!;
  const findings = (
    await dbx
      .selectFrom('findings')
      .select(['id', 'sample_id', 'rule_id', 'level', 'measurand', 'sentence'])
      .where('sample_id', 'in', sampleIds)
      .execute()
  ).map((f) => ({ ...f, at: at(f.sample_id) }));
  const calls = (
    await dbx
      .selectFrom('interval_calls')
      .select(['id', 'sample_id', 'call', 'next_interval', 'reasons'])
      .where('sample_id', 'in', sampleIds)
      .where('source', '=', 'engine')
      .execute()
  ).map((c) => ({ ...c, at: at(c.sample_id) }));
  const bands = (
    await dbx
      .selectFrom('baseline_bands')
      .select(['sample_id', 'measurand', 'n', 'mean', 'act_from'])
      .where('sample_id', 'in', sampleIds)
      .execute()
  ).map((b) => ({ ...b, at: at(b.sample_id) }));
  const order = (a: { at: number; key: string }, b: { at: number; key: string }) =>
    a.at - b.at || a.key.localeCompare(b.key);
  return {
    findings: findings.map((f) => ({ ...f, key: `${f.rule_id}|${f.measurand}|${f.sentence}` })).sort(order),
    calls: calls.map((c) => ({ ...c, key: '' })).sort(order),
    bands: bands.map((b) => ({ ...b, key: b.measurand })).sort(order),
  };
}

/** The stored rows without their row ids: what the engine said, not which row holds it. */
const content = (s: Awaited<ReturnType<typeof stored>>) => ({
  findings: s.findings.map(({ id: _id, ...rest }) => rest),
  calls: s.calls.map(({ id: _id, ...rest }) => rest),
  bands: s.bands,
});

/** A machine with the long history, judged whole once, and what that judging stored. */
async function judgedMachine() {
  const c = await makeCrewWithRoles(db);
  const m = await c.machine({ meter: 'km', cooling: 'liquid' } as Partial<Database['machines']>);
  const ids = await addSamples(db, c.crew.id, m.id, c.rider.id, history());
  await db.transaction().execute((trx) => recomputeMachineFindings(trx, m.id, null));
  return { m, ids, whole: await stored(db, ids) };
}

describe('a long history judged again a run of samples at a time', () => {
  test('judged whole: every sample gets one engine call, the climb its findings, and bands once the baseline holds', async () => {
    const c = await makeCrewWithRoles(db);
    const m = await c.machine({ meter: 'km', cooling: 'liquid' } as Partial<Database['machines']>);
    const ids = await addSamples(db, c.crew.id, m.id, c.rider.id, history());
    const written = await db.transaction().execute((trx) => recomputeMachineFindings(trx, m.id, null));
    const s = await stored(db, ids);

    expect(written).toBe(s.findings.length);
    // One engine call per sample, none missing and none twice, the last sample included.
    expect(s.calls.map((x) => x.at)).toEqual(Array.from({ length: SAMPLES }, (_, i) => i));
    // The iron climb of the last ten samples is found; the steady samples before it give no act finding on iron.
    const ironAct = s.findings.filter((f) => f.measurand === 'Fe' && f.level === 'act').map((f) => f.at);
    expect(ironAct.length).toBeGreaterThan(0);
    expect(Math.min(...ironAct)).toBeGreaterThanOrEqual(CLIMB_FROM);
    // Bands for iron on every late sample, the last one included.
    const ironBands = new Set(s.bands.filter((b) => b.measurand === 'Fe').map((b) => b.at));
    for (let i = 30; i < SAMPLES; i += 1) expect(ironBands.has(i)).toBe(true);
  });

  const B = JUDGED_BATCH;
  test.each([0, 1, B - 1, B, B + 1, 2 * B - 1, 2 * B, SAMPLES - 1])(
    'judged again from sample %i: the same results from there on, the samples before it untouched',
    async (from) => {
      const { m, ids, whole } = await judgedMachine();

      const written = await db
        .transaction()
        .execute((trx) => recomputeMachineFindings(trx, m.id, new Set([ids[from]!])));
      const again = await stored(db, ids);

      expect(content(again)).toEqual(content(whole));
      expect(written).toBe(again.findings.filter((f) => f.at >= from).length);
      // Rows before the first changed sample are the very same rows; from it on they were written anew.
      const before = (rows: { id: string; at: number }[]) => rows.filter((r) => r.at < from).map((r) => r.id);
      const after = (rows: { id: string; at: number }[]) => new Set(rows.filter((r) => r.at >= from).map((r) => r.id));
      expect(before(again.findings)).toEqual(before(whole.findings));
      expect(before(again.calls)).toEqual(before(whole.calls));
      const oldIds = new Set([...whole.findings, ...whole.calls].map((r) => r.id));
      for (const id of [...after(again.findings), ...after(again.calls)]) expect(oldIds.has(id)).toBe(false);
    },
  );

  // The next run is judged while PostgreSQL stores the one before, so a write can fail while the judging has
  // moved on: the failure must still reach the caller and take the whole judging with it.
  test.each([JUDGED_BATCH + 50, SAMPLES - 1])(
    'a write that PostgreSQL refuses at sample %i fails the judging, and nothing of it stays',
    async (failAt) => {
      const { m, ids, whole } = await judgedMachine();

      const judging = db.transaction().execute(async (trx) => {
        // A trigger made inside the transaction, gone with it: refuses the bands of one sample.
        await sql
          .raw(
            `create function refuse_one_band() returns trigger language plpgsql as $$
             begin
               if new.sample_id = '${ids[failAt]}'::uuid then raise exception 'band refused for the test'; end if;
               return new;
             end $$`,
          )
          .execute(trx);
        await sql`create trigger refuse_one_band before insert on baseline_bands for each row execute function refuse_one_band()`.execute(
          trx,
        );
        return recomputeMachineFindings(trx, m.id, null);
      });
      await expect(judging).rejects.toThrow('band refused for the test');
      // Rolled back whole: the rows judged before the failure are the very rows there were before.
      expect(await stored(db, ids)).toEqual(whole);
    },
  );
});
