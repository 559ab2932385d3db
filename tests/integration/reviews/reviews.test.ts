import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { openTestDb, truncateAll } from '../test-database';
import { addReviewNote, decideIntervalCall, loadSampleReview } from '~/lib/reviews/reviews.service';
import { callDecisionSchema } from '~/lib/reviews/reviews';
import { addSamples, makeCrewWithRoles } from '../trends/decision-fixtures';

const db = openTestDb();
afterAll(() => db.destroy());
beforeEach(() => truncateAll(db));

async function setup(state: 'results_in' | 'shipped' = 'results_in', withCall = true) {
  const c = await makeCrewWithRoles(db);
  const machine = await c.machine({ meter: 'mi' });
  const [sampleId] = await addSamples(db, c.crew.id, machine.id, c.rider.id, [
    {
      drawnOn: '2026-01-01',
      odometer: 1000,
      state,
      readings: { Fe: 10 },
      ...(withCall ? { call: { call: 'shorten' as const, nextSampleOn: '2026-02-01', nextSampleOdometer: 1500 } } : {}),
    },
  ]);
  return { c, machine, sampleId: sampleId! };
}

describe('decideIntervalCall', () => {
  test('a mechanic confirms: the engine call is copied as theirs and the sample becomes reviewed', async () => {
    const { c, sampleId } = await setup();
    const r = await decideIntervalCall(db, { userId: c.mechanic.id, membership: c.m('mechanic') }, sampleId, {
      action: 'confirm',
      note: '',
    });
    expect(r.ok).toBe(true);
    const review = await loadSampleReview(db, c.crew.id, sampleId);
    expect(review!.calls.map((x) => [x.source, x.call, x.nextSampleOdometer, x.nextSampleOn])).toEqual([
      ['confirmed', 'shorten', 1500, '2026-02-01'],
      ['engine', 'shorten', 1500, '2026-02-01'],
    ]);
    expect(review!.current!.madeByName).toBe('Mech');
    const s = await db.selectFrom('samples').select('state').where('id', '=', sampleId).executeTakeFirstOrThrow();
    expect(s.state).toBe('reviewed');
    const events = await db
      .selectFrom('sample_events')
      .select(['state', 'actor_user_id'])
      .where('sample_id', '=', sampleId)
      .execute();
    expect(events).toEqual([{ state: 'reviewed', actor_user_id: c.mechanic.id }]);
  });

  test('a lead overrides with a note; figures in the machine’s miles are stored in km', async () => {
    const { c, sampleId } = await setup();
    const decision = callDecisionSchema.parse({
      action: 'override',
      call: 'stretch',
      note: 'New filter fitted',
      nextInterval: '1000',
      nextSampleOn: '',
    });
    const r = await decideIntervalCall(db, { userId: c.lead.id, membership: c.m('lead') }, sampleId, decision);
    expect(r.ok).toBe(true);
    const review = await loadSampleReview(db, c.crew.id, sampleId);
    expect(review!.current!.source).toBe('override');
    expect(review!.current!.call).toBe('stretch');
    expect(review!.current!.reasons).toEqual(['New filter fitted']);
    // 1,000 mi = 1,609.344 km (NIST SP 811); the date stays the engine's when none is given.
    expect(review!.current!.nextInterval).toBeCloseTo(1609.344, 6);
    expect(review!.current!.nextSampleOn).toBe('2026-02-01');
  });

  test.each([['a rider', 'rider', 'forbidden']] as const)('%s may not decide', async (_n, role, code) => {
    const { c, sampleId } = await setup();
    const r = await decideIntervalCall(db, { userId: c.rider.id, membership: c.m(role) }, sampleId, {
      action: 'confirm',
      note: '',
    });
    expect(r).toMatchObject({ ok: false, code });
    await expect(
      db.selectFrom('interval_calls').select('id').where('source', '!=', 'engine').execute(),
    ).resolves.toEqual([]);
  });

  test('another crew’s mechanic gets not found and writes nothing', async () => {
    const { sampleId } = await setup();
    const other = await makeCrewWithRoles(db, 'Other');
    const r = await decideIntervalCall(db, { userId: other.mechanic.id, membership: other.m('mechanic') }, sampleId, {
      action: 'confirm',
      note: '',
    });
    expect(r).toMatchObject({ ok: false, code: 'not_found' });
    await expect(
      db.selectFrom('interval_calls').select('id').where('source', '!=', 'engine').execute(),
    ).resolves.toEqual([]);
  });

  test.each([
    ['no results yet', 'shipped', true, 'no_results'],
    ['nothing to confirm', 'results_in', false, 'no_call'],
  ] as const)('confirm refused: %s', async (_n, state, withCall, code) => {
    const { c, sampleId } = await setup(state, withCall);
    const r = await decideIntervalCall(db, { userId: c.mechanic.id, membership: c.m('mechanic') }, sampleId, {
      action: 'confirm',
      note: '',
    });
    expect(r).toMatchObject({ ok: false, code });
  });

  test.each([
    [{ action: 'override', call: 'hold', note: '' }, 'note'],
    [{ action: 'override', call: 'hold', note: '   ' }, 'note'],
    [{ action: 'override', call: 'later', note: 'x' }, 'call'],
    [{ action: 'override', call: 'hold', note: 'x', nextInterval: '-5' }, 'nextInterval'],
    [{ action: 'override', call: 'hold', note: 'x', nextSampleOn: '1/2/2026' }, 'nextSampleOn'],
  ])('an override %j is refused on %s', (input, field) => {
    const r = callDecisionSchema.safeParse(input);
    expect(r.success).toBe(false);
    expect(r.error!.issues.map((i) => i.path[0])).toContain(field);
  });
});

describe('addReviewNote', () => {
  test.each([
    ['mechanic', true],
    ['lead', true],
    ['rider', false],
  ] as const)('a %s writes a note: %s', async (role, allowed) => {
    const { c, sampleId } = await setup();
    const user = role === 'mechanic' ? c.mechanic : role === 'lead' ? c.lead : c.rider;
    const r = await addReviewNote(db, { userId: user.id, membership: c.m(role) }, sampleId, 'Valve clearances checked');
    expect(r.ok).toBe(allowed);
    const review = await loadSampleReview(db, c.crew.id, sampleId);
    expect(review!.notes.map((n) => [n.body, n.authorRole])).toEqual(
      allowed ? [['Valve clearances checked', role]] : [],
    );
  });
});
