import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { sql } from 'kysely';
import { openTestDb, truncateAll } from '../test-database';
import { confirmSteadyCalls, undoSteadyConfirmations } from '~/lib/reviews/reviews.service';
import { steadyUndoSchema } from '~/lib/reviews/reviews';
import { listMachineVerdicts, listSampleVerdicts, countSteadyReviewQueue } from '~/lib/verdicts/verdicts.repository';
import { addSamples, makeCrewWithRoles } from '../trends/decision-fixtures';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

/** Two steady samples (hold, stretch), one steady with a shorten call, one at watch, one not back from the lab. */
async function setup() {
  const c = await makeCrewWithRoles(db);
  const machine = await c.machine();
  const ids = await addSamples(db, c.crew.id, machine.id, c.rider.id, [
    { drawnOn: '2026-01-01', odometer: 1000, state: 'results_in', readings: { Fe: 10 }, call: { call: 'hold' } },
    { drawnOn: '2026-02-01', odometer: 2000, state: 'results_in', readings: { Fe: 11 }, call: { call: 'stretch' } },
    { drawnOn: '2026-03-01', odometer: 3000, state: 'results_in', readings: { Fe: 12 }, call: { call: 'shorten' } },
    {
      drawnOn: '2026-04-01',
      odometer: 4000,
      state: 'results_in',
      readings: { Fe: 40 },
      call: { call: 'hold' },
      findings: [{ measurand: 'Fe', level: 'watch', ruleId: 'climbing-trend' }],
    },
    { drawnOn: '2026-05-01', odometer: 5000, state: 'shipped' },
  ]);
  return { c, machine, ids };
}

const states = async (ids: string[]) =>
  (await db.selectFrom('samples').select(['id', 'state']).where('id', 'in', ids).execute())
    .sort((a, b) => ids.indexOf(a.id) - ids.indexOf(b.id))
    .map((s) => s.state);
const reviewerCalls = () =>
  db.selectFrom('interval_calls').select(['sample_id', 'source', 'call']).where('source', '!=', 'engine').execute();

describe('confirming every steady call in one step', () => {
  test('a mechanic confirms only the steady hold and stretch calls, one confirmed call and event per sample', async () => {
    const { c, ids } = await setup();
    expect(await countSteadyReviewQueue(db, c.crew.id)).toBe(2);
    const r = await confirmSteadyCalls(db, { userId: c.mechanic.id, membership: c.m('mechanic') });
    expect(r).toMatchObject({ ok: true, value: { confirmed: 2 } });
    expect(await states(ids)).toEqual(['reviewed', 'reviewed', 'results_in', 'results_in', 'shipped']);
    const calls = await reviewerCalls();
    expect(calls.map((x) => [x.sample_id, x.source, x.call]).sort()).toEqual(
      [
        [ids[0], 'confirmed', 'hold'],
        [ids[1], 'confirmed', 'stretch'],
      ].sort(),
    );
    const events = await db.selectFrom('sample_events').select(['sample_id', 'state', 'actor_user_id']).execute();
    expect(events).toHaveLength(2);
    expect(events.every((e) => e.state === 'reviewed' && e.actor_user_id === c.mechanic.id)).toBe(true);
    const audit = await db.selectFrom('audit_events').select(['kind', 'detail']).execute();
    expect(audit.map((a) => a.kind)).toEqual(['steady_calls_confirmed']);
    expect(await countSteadyReviewQueue(db, c.crew.id)).toBe(0);
    // A second click finds nothing left and writes nothing.
    const again = await confirmSteadyCalls(db, { userId: c.mechanic.id, membership: c.m('mechanic') });
    expect(again).toMatchObject({ ok: true, value: { confirmed: 0 } });
    expect(await reviewerCalls()).toHaveLength(2);
  });

  test('undo within the seconds offered removes the calls and returns the samples to results in', async () => {
    const { c, ids } = await setup();
    const actor = { userId: c.lead.id, membership: c.m('lead') };
    const r = await confirmSteadyCalls(db, actor);
    if (!r.ok) throw new Error(r.message);
    const u = await undoSteadyConfirmations(db, actor, r.value.callIds);
    expect(u).toEqual({ ok: true, value: { undone: 2 } });
    expect(await states(ids)).toEqual(['results_in', 'results_in', 'results_in', 'results_in', 'shipped']);
    expect(await reviewerCalls()).toEqual([]);
    expect(await countSteadyReviewQueue(db, c.crew.id)).toBe(2);
    const audit = await db.selectFrom('audit_events').select('kind').orderBy('id').execute();
    expect(audit.map((a) => a.kind)).toEqual(['steady_calls_confirmed', 'steady_calls_unconfirmed']);
  });

  test('undo after the window, or of a call changed since, is refused and changes nothing', async () => {
    const { c, ids } = await setup();
    const actor = { userId: c.mechanic.id, membership: c.m('mechanic') };
    const r = await confirmSteadyCalls(db, actor);
    if (!r.ok) throw new Error(r.message);
    await sql`update interval_calls set created_at = now() - interval '1 minute' where source = 'confirmed'`.execute(
      db,
    );
    expect(await undoSteadyConfirmations(db, actor, r.value.callIds)).toMatchObject({
      ok: false,
      code: 'undo_expired',
    });
    expect(await states(ids)).toEqual(['reviewed', 'reviewed', 'results_in', 'results_in', 'shipped']);
    expect(await reviewerCalls()).toHaveLength(2);
  });

  test.each([['a rider', 'rider' as const, 'forbidden']])('%s may neither confirm nor undo', async (_n, role, code) => {
    const { c } = await setup();
    const actor = { userId: c.rider.id, membership: c.m(role) };
    expect(await confirmSteadyCalls(db, actor)).toMatchObject({ ok: false, code });
    expect(await undoSteadyConfirmations(db, actor, [crypto.randomUUID()])).toMatchObject({ ok: false, code });
    expect(await reviewerCalls()).toEqual([]);
  });

  test('another crew’s lead confirms nothing of this crew and cannot undo this crew’s confirmations', async () => {
    const { c, ids } = await setup();
    const other = await makeCrewWithRoles(db, 'Other');
    const otherLead = { userId: other.lead.id, membership: other.m('lead') };
    expect(await confirmSteadyCalls(db, otherLead)).toMatchObject({ ok: true, value: { confirmed: 0 } });
    const r = await confirmSteadyCalls(db, { userId: c.mechanic.id, membership: c.m('mechanic') });
    if (!r.ok) throw new Error(r.message);
    expect(await undoSteadyConfirmations(db, otherLead, r.value.callIds)).toMatchObject({ code: 'not_found' });
    // Another member of the same crew may not undo the mechanic's own step either.
    const lead = { userId: c.lead.id, membership: c.m('lead') };
    expect(await undoSteadyConfirmations(db, lead, r.value.callIds)).toMatchObject({ code: 'not_found' });
    expect(await states(ids)).toEqual(['reviewed', 'reviewed', 'results_in', 'results_in', 'shipped']);
  });

  test.each([
    ['a 100 KB string', 'x'.repeat(100_000)],
    ['ids that are not uuids', 'a,b,c'],
    ['no ids', ''],
    ['too many ids', Array.from({ length: 201 }, () => crypto.randomUUID()).join(',')],
  ])('the undo form refuses %s', (_n, callIds) => {
    expect(steadyUndoSchema.safeParse({ callIds }).success).toBe(false);
  });
});

describe('verdicts for lists', () => {
  test('samples with results get their worst level and current call; a machine gets its latest sample’s', async () => {
    const { c, machine, ids } = await setup();
    const v = await listSampleVerdicts(db, c.crew.id, ids);
    expect([...v.keys()].sort()).toEqual(ids.slice(0, 4).sort());
    expect(ids.slice(0, 4).map((id) => [v.get(id)!.level, v.get(id)!.call])).toEqual([
      ['steady', 'hold'],
      ['steady', 'stretch'],
      ['steady', 'shorten'],
      ['watch', 'hold'],
    ]);
    expect(v.get(ids[3]!)!.top).toEqual({ ruleId: 'climbing-trend', measurand: 'Fe' });
    const m = await listMachineVerdicts(db, c.crew.id, [machine.id]);
    expect(m.get(machine.id)).toMatchObject({ sampleId: ids[3], level: 'watch', nextInterval: 1000 });
    const other = await makeCrewWithRoles(db, 'Other');
    expect((await listSampleVerdicts(db, other.crew.id, ids)).size).toBe(0);
    expect((await listMachineVerdicts(db, other.crew.id, [machine.id])).size).toBe(0);
  });
});
