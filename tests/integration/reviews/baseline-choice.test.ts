import { sql } from 'kysely';
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { ENGINE_VERSION } from '~/lib/analysis';
import { recomputeMachineFindings, recomputeStaleMachines } from '~/lib/findings/findings.service';
import { baselineChoiceSchema } from '~/lib/reviews/reviews';
import { changeSampleBaseline, loadBaselineStatus } from '~/lib/reviews/reviews.service';
import { listTrendSamples } from '~/lib/trends/trends.repository';
import { openTestDb, truncateAll } from '../test-database';
import { addSamples, makeCrewWithRoles } from '../trends/decision-fixtures';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

// Invented history: five steady samples, then a sample with a bad draw (Fe 60), then a steady one and one at 45.
async function setup() {
  const c = await makeCrewWithRoles(db);
  const machine = await c.machine({ meter: 'km' });
  const fe = [20, 21, 19, 20, 20, 60, 20, 45];
  const ids = await addSamples(
    db,
    c.crew.id,
    machine.id,
    c.rider.id,
    fe.map((v, i) => ({
      drawnOn: `2026-0${1 + Math.floor(i / 2)}-${i % 2 ? '20' : '05'}`,
      odometer: (i + 1) * 1000,
      readings: { Fe: v, Al: 4, KV100: 13.8, FUEL: 0.5, WATER: 0.02 },
    })),
  );
  await db.transaction().execute((trx) => recomputeMachineFindings(trx, machine.id, new Set(ids)));
  return { c, machine, ids };
}

const feLevel = async (sampleId: string) =>
  (
    await db
      .selectFrom('findings')
      .select(['level', 'rule_id'])
      .where('sample_id', '=', sampleId)
      .where('measurand', '=', 'Fe')
      .execute()
  )
    .map((f) => `${f.rule_id}:${f.level}`)
    .sort();
const callOf = async (sampleId: string) =>
  (
    await db
      .selectFrom('interval_calls')
      .select('call')
      .where('sample_id', '=', sampleId)
      .where('source', '=', 'engine')
      .executeTakeFirstOrThrow()
  ).call;

describe('a lead or mechanic takes a sample out of the baseline, or puts it back', () => {
  test('the machine is judged again from that sample on, the change is audited and shown', async () => {
    const { c, machine, ids } = await setup();
    const suspect = ids[3]!;
    // With sample 4 out, the band of sample 8 has one sample fewer; what matters is that it was judged again.
    const beforeBands = await db
      .selectFrom('baseline_bands')
      .select(['sample_id', 'n'])
      .where('measurand', '=', 'Fe')
      .where('sample_id', '=', ids[7]!)
      .executeTakeFirstOrThrow();
    const r = await changeSampleBaseline(
      db,
      { userId: c.mechanic.id, membership: c.m('mechanic') },
      suspect,
      baselineChoiceSchema.parse({
        action: 'exclude',
        reason: 'Drawn from the drain plug after a top-up',
        breakIn: 'on',
      }),
    );
    expect(r.ok).toBe(true);
    const afterBands = await db
      .selectFrom('baseline_bands')
      .select(['sample_id', 'n'])
      .where('measurand', '=', 'Fe')
      .where('sample_id', '=', ids[7]!)
      .executeTakeFirstOrThrow();
    expect(afterBands.n).toBe(beforeBands.n - 1);
    const status = await loadBaselineStatus(db, c.crew.id, suspect);
    expect(status).toMatchObject({
      inBaseline: false,
      note: 'Drawn from the drain plug after a top-up',
      breakIn: true,
      changedByName: 'Mech',
    });
    const audit = await db
      .selectFrom('audit_events')
      .select(['kind', 'actor_user_id', 'detail'])
      .where('crew_id', '=', c.crew.id)
      .execute();
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ kind: 'baseline_excluded', actor_user_id: c.mechanic.id });
    expect(audit[0]!.detail).toMatchObject({
      sampleId: suspect,
      reason: 'Drawn from the drain plug after a top-up',
      breakIn: true,
    });
    // The wear chart sees the exclusion and its reason.
    const rows = await listTrendSamples(db, { id: machine.id, oil_capacity_l: null }, ['Fe']);
    expect(rows.find((x) => x.id === suspect)).toMatchObject({
      inBaseline: false,
      baselineNote: 'Drawn from the drain plug after a top-up',
    });

    const back = await changeSampleBaseline(
      db,
      { userId: c.lead.id, membership: c.m('lead') },
      suspect,
      baselineChoiceSchema.parse({ action: 'include', reason: 'Checked the drain card: drawn mid-stream after all' }),
    );
    expect(back.ok).toBe(true);
    expect(await loadBaselineStatus(db, c.crew.id, suspect)).toMatchObject({
      inBaseline: true,
      breakIn: false,
      changedByName: 'Lead',
    });
    const n = await db
      .selectFrom('baseline_bands')
      .select('n')
      .where('measurand', '=', 'Fe')
      .where('sample_id', '=', ids[7]!)
      .executeTakeFirstOrThrow();
    expect(n.n).toBe(beforeBands.n);
  });

  test('the act sample is already out of its band by itself; taking it out by hand leaves later bands as they were', async () => {
    const { c, ids } = await setup();
    expect(await feLevel(ids[5]!)).toContain('baseline-jump:act');
    const band = () =>
      db
        .selectFrom('baseline_bands')
        .select(['n', 'mean', 'watch_above'])
        .where('measurand', '=', 'Fe')
        .where('sample_id', '=', ids[7]!)
        .executeTakeFirstOrThrow();
    const before = await band();
    await changeSampleBaseline(db, { userId: c.lead.id, membership: c.m('lead') }, ids[5]!, {
      action: 'exclude',
      reason: 'Bad draw',
      breakIn: false,
    });
    expect(await band()).toEqual(before);
  });

  test('a rider may not, another crew gets not found, and nothing changes', async () => {
    const { c, ids } = await setup();
    const rider = await changeSampleBaseline(db, { userId: c.rider.id, membership: c.m('rider') }, ids[2]!, {
      action: 'exclude',
      reason: 'Because',
      breakIn: false,
    });
    expect(rider).toMatchObject({ ok: false, code: 'forbidden' });
    const other = await makeCrewWithRoles(db, 'Other crew');
    const stranger = await changeSampleBaseline(db, { userId: other.lead.id, membership: other.m('lead') }, ids[2]!, {
      action: 'exclude',
      reason: 'Because',
      breakIn: false,
    });
    expect(stranger).toMatchObject({ ok: false, code: 'not_found' });
    expect((await loadBaselineStatus(db, c.crew.id, ids[2]!))!.inBaseline).toBe(true);
    expect(await db.selectFrom('audit_events').selectAll().execute()).toHaveLength(0);
  });

  test.each([
    ['an empty reason', { action: 'exclude', reason: '' }, 'Say why'],
    ['a 100 KB reason', { action: 'exclude', reason: 'x'.repeat(100_000) }, 'under 500'],
    ['an unknown action', { action: 'drop', reason: 'Bad draw' }, 'Choose'],
  ])('%s is refused with a clear message', (_name, input, message) => {
    const parsed = baselineChoiceSchema.safeParse(input);
    expect(parsed.success).toBe(false);
    expect(JSON.stringify(parsed.error?.issues)).toContain(message);
  });
});

describe('stored results follow the engine', () => {
  test('machines judged by an older engine are judged again, one transaction each, and marked', async () => {
    const { machine, ids } = await setup();
    const other = await makeCrewWithRoles(db, 'Second crew');
    const m2 = await other.machine({ meter: 'km' });
    const ids2 = await addSamples(db, other.crew.id, m2.id, other.rider.id, [
      { drawnOn: '2026-01-01', odometer: 1000, readings: { Fe: 20 }, call: { call: 'stretch' } },
    ]);
    // An older engine's results: a stale finding and call, and no version stamp.
    await db.deleteFrom('findings').execute();
    await db
      .insertInto('findings')
      .values({
        sample_id: ids[0]!,
        measurand: 'Fe',
        level: 'act',
        rule_id: 'baseline-jump',
        numbers: '{}',
        sentence: 'old engine',
      })
      .execute();
    await db.updateTable('machines').set({ judged_by: '2026-01-01.old' }).execute();
    const done = await recomputeStaleMachines(db);
    expect(done).toBe(2);
    expect(await db.selectFrom('findings').selectAll().where('sentence', '=', 'old engine').execute()).toHaveLength(0);
    expect(await feLevel(ids[5]!)).toContain('baseline-jump:act');
    expect(await callOf(ids2[0]!)).toBe('hold');
    const versions = await db
      .selectFrom('machines')
      .select('judged_by')
      .where('id', 'in', [machine.id, m2.id])
      .execute();
    expect(versions.every((v) => v.judged_by === ENGINE_VERSION)).toBe(true);
    // Nothing left to do the second time.
    expect(await recomputeStaleMachines(db)).toBe(0);
  });

  test('the call check constraint accepts fix-first and still refuses a word outside the four', async () => {
    const { machine, ids } = await setup();
    await db
      .insertInto('interval_calls')
      .values({
        sample_id: ids[0]!,
        machine_id: machine.id,
        call: 'fix-first',
        reasons: '[]',
        source: 'override',
        made_by: null,
      })
      .execute();
    await expect(
      sql`insert into interval_calls (sample_id, machine_id, call, source) values (${ids[0]!}, ${machine.id}, 'ignore', 'override')`.execute(
        db,
      ),
    ).rejects.toThrow(/interval_calls_call_check/);
  });
});
