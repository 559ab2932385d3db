import type { Kysely } from 'kysely';
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type { AlertEnv } from '~/lib/alerts/alerts';
import { applyUnsubscribe } from '~/lib/alerts/unsubscribe.service';
import type { Database } from '~/lib/db/database';
import { runReminders } from '~/lib/reminders/reminders.service';
import { addMember, makeMachine } from '../factories';
import { makeSample } from '../lab-import/lab-import-fixtures';
import { openTestDb, truncateAll } from '../test-database';
import { makeAlertCrew, outboxByRecipient, tokenFromHeaders } from './alert-fixtures';

// The reminder functions take `now`: these tests move a simulated clock instead of waiting for cron.
const db = openTestDb();
const env: AlertEnv = { publicUrl: 'https://sumpwise.test', secret: 'reminder-test-secret-of-at-least-32-chars' };
afterAll(async () => {
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

const at = (iso: string) => new Date(iso.length === 10 ? `${iso}T07:17:00Z` : iso);
const countKind = async (kind: string) =>
  (await db.selectFrom('mail_outbox').select('id').where('kind', '=', kind).execute()).length;

/** A sample with results and the engine's interval call naming the next sample. */
async function giveIntervalCall(
  d: Kysely<Database>,
  c: { crewId: string; machineId: string; rider: { id: string } },
  next: { on?: string; odometer?: number },
) {
  const s = await makeSample(d, c.crewId, c.machineId, c.rider.id, `IC-${Math.random().toString(36).slice(2, 7)}`, {
    drawnOn: '2026-01-10',
    odometer: 1000,
  });
  await d.updateTable('samples').set({ state: 'reviewed' }).where('id', '=', s.id).execute();
  await d
    .insertInto('interval_calls')
    .values({
      sample_id: s.id,
      machine_id: c.machineId,
      call: 'hold',
      next_interval: 3000,
      next_sample_odometer: next.odometer ?? null,
      next_sample_on: next.on ?? null,
      reasons: JSON.stringify(['invented']),
      source: 'engine',
      made_by: null,
    })
    .execute();
}

async function shipSample(
  d: Kysely<Database>,
  c: { crewId: string; machineId: string; rider: { id: string } },
  code: string,
  shippedAt: string,
) {
  const s = await makeSample(d, c.crewId, c.machineId, c.rider.id, code, { drawnOn: shippedAt.slice(0, 10) });
  await d
    .insertInto('sample_events')
    .values({ sample_id: s.id, state: 'shipped', actor_user_id: c.rider.id, at: new Date(shippedAt) })
    .execute();
  return s.id;
}

describe('next sample due', () => {
  test('by date: nothing the day before, one message to each of rider, mechanic and lead on the day, and never again', async () => {
    const c = await makeAlertCrew(db);
    await giveIntervalCall(db, c, { on: '2026-06-01' });
    expect((await runReminders(db, { now: at('2026-05-31'), env })).sampleDue).toEqual({});
    expect(await countKind('reminder_sample_due')).toBe(0);

    expect((await runReminders(db, { now: at('2026-06-01'), env })).sampleDue).toEqual({ immediate: 3 });
    const byTo = await outboxByRecipient(db, 'reminder_sample_due');
    expect([...byTo.keys()].sort()).toEqual([c.lead.email, c.mechanic.email, c.rider.email].sort());
    const riderMail = byTo.get(c.rider.email)![0]!;
    expect(riderMail.idempotency_key).toBe(`reminder:sample-due:${c.machineId}:2026-06-01:${c.rider.id}`);
    expect(riderMail.subject).toBe('Sample due: Ridge 450 (Valley school)');
    expect(riderMail.text_body).toContain('the next sample was due on 1 Jun 2026');
    expect(riderMail.text_body).toContain(`https://sumpwise.test/machines/${c.machineId}/drain-card`);

    // The same hour again (a retried job), and the days after: nothing more.
    expect((await runReminders(db, { now: at('2026-06-01'), env })).sampleDue).toEqual({ duplicate: 3 });
    await runReminders(db, { now: at('2026-06-02'), env });
    await runReminders(db, { now: at('2026-07-15'), env });
    expect(await countKind('reminder_sample_due')).toBe(3);
  });

  test('a new interval call with a later target reminds again, once, when that target comes', async () => {
    const c = await makeAlertCrew(db);
    await giveIntervalCall(db, c, { on: '2026-06-01' });
    await runReminders(db, { now: at('2026-06-01'), env });
    await giveIntervalCall(db, c, { on: '2026-09-01' });
    await runReminders(db, { now: at('2026-08-31'), env });
    expect(await countKind('reminder_sample_due')).toBe(3);
    await runReminders(db, { now: at('2026-09-01'), env });
    await runReminders(db, { now: at('2026-09-02'), env });
    expect(await countKind('reminder_sample_due')).toBe(6);
  });

  test('by odometer estimated from recent riding (manual interval from the last oil change)', async () => {
    const c = await makeAlertCrew(db);
    // Invented history: oil changed at 10,000 km on 1 January, a sample at 11,000 km on 1 February: about
    // 32.3 km a day. The manual's 3,000 km interval puts the next sample at 13,000 km, reached around 4 April.
    await db
      .insertInto('oil_changes')
      .values({
        crew_id: c.crewId,
        machine_id: c.machineId,
        changed_on: '2026-01-01',
        odometer: 10_000,
        sae_grade: '10W-40',
        other_work: JSON.stringify([]),
        created_by: c.rider.id,
      })
      .execute();
    const s = await makeSample(db, c.crewId, c.machineId, c.rider.id, 'SW-ODO', {
      drawnOn: '2026-02-01',
      odometer: 11_000,
    });
    await db.updateTable('samples').set({ state: 'reviewed' }).where('id', '=', s.id).execute();

    // 20 March: 11,000 + 47 days × 32.26 ≈ 12,516 km, short of 13,000.
    expect((await runReminders(db, { now: at('2026-03-20'), env })).sampleDue).toEqual({});
    // 10 April: 11,000 + 68 × 32.26 ≈ 13,194 km, past it.
    expect((await runReminders(db, { now: at('2026-04-10'), env })).sampleDue).toEqual({ immediate: 3 });
    const mail = (await outboxByRecipient(db, 'reminder_sample_due')).get(c.rider.email)![0]!;
    expect(mail.idempotency_key).toBe(`reminder:sample-due:${c.machineId}:13000u:${c.rider.id}`);
    expect(mail.text_body).toMatch(/due at 13,000 km and, from its recent riding, it is probably near 13,19\d km now/);
    await runReminders(db, { now: at('2026-04-20'), env });
    expect(await countKind('reminder_sample_due')).toBe(3);
  });

  test('a machine with a bottle already drawn or shipped is not reminded; an archived one neither', async () => {
    const c = await makeAlertCrew(db);
    await giveIntervalCall(db, c, { on: '2026-06-01' });
    await shipSample(db, c, 'SW-ON-ITS-WAY', '2026-05-30T09:00:00Z');
    expect((await runReminders(db, { now: at('2026-06-02'), env })).sampleDue).toEqual({});
    const archived = await makeMachine(db, c.crewId, c.rider.id, {
      name: 'Old 650',
      archived_at: new Date(),
      max_interval_days: 30,
    } as never);
    await db
      .insertInto('oil_changes')
      .values({
        crew_id: c.crewId,
        machine_id: archived.id,
        changed_on: '2026-01-01',
        odometer: 500,
        sae_grade: '10W-40',
        other_work: JSON.stringify([]),
        created_by: c.rider.id,
      })
      .execute();
    await runReminders(db, { now: at('2026-06-02'), env });
    expect(await countKind('reminder_sample_due')).toBe(0);
  });
});

describe('shipped without results', () => {
  test('nothing at 20 days, one message to each recipient at 21, never again; results in stops it', async () => {
    const c = await makeAlertCrew(db);
    const sampleId = await shipSample(db, c, 'SW-LATE', '2026-03-01T15:00:00Z');
    await shipSample(db, c, 'SW-BACK', '2026-03-01T15:00:00Z').then((id) =>
      db.updateTable('samples').set({ state: 'results_in' }).where('id', '=', id).execute(),
    );
    expect((await runReminders(db, { now: at('2026-03-21'), env })).shippedOverdue).toEqual({});
    expect((await runReminders(db, { now: at('2026-03-22'), env })).shippedOverdue).toEqual({ immediate: 3 });
    const byTo = await outboxByRecipient(db, 'reminder_shipped_overdue');
    expect(byTo.size).toBe(3);
    expect(byTo.get(c.mechanic.email)![0]!.idempotency_key).toBe(
      `reminder:shipped-overdue:${sampleId}:${c.mechanic.id}`,
    );
    expect(byTo.get(c.mechanic.email)![0]!.subject).toBe('No results yet: bottle SW-LATE of Ridge 450 (Valley school)');
    await runReminders(db, { now: at('2026-03-22'), env });
    await runReminders(db, { now: at('2026-04-30'), env });
    expect(await countKind('reminder_shipped_overdue')).toBe(3);
  });
});

describe('invitation not accepted', () => {
  test("the crew's leads hear once after 7 days; accepted or revoked invitations never", async () => {
    const c = await makeAlertCrew(db);
    const secondLead = await db
      .insertInto('users')
      .values({
        id: 'second-lead',
        email: 'second-lead@valley.example',
        display_name: 'Second lead',
        password_hash: 'x',
        email_verified_at: new Date(),
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await addMember(db, c.crewId, secondLead.id, 'lead');
    const invite = async (email: string, over: Record<string, unknown> = {}) =>
      db
        .insertInto('crew_invitations')
        .values({
          crew_id: c.crewId,
          email,
          role: 'rider',
          token_hash: `hash-${email}`,
          invited_by: c.lead.id,
          expires_at: new Date('2026-03-15T10:00:00Z'),
          created_at: new Date('2026-03-01T10:00:00Z'),
          ...over,
        } as never)
        .returning('id')
        .executeTakeFirstOrThrow();
    const waiting = await invite('newcomer@example.test');
    await invite('joined@example.test', {
      accepted_at: new Date('2026-03-02T10:00:00Z'),
      accepted_by: c.otherRider.id,
    });
    await invite('revoked@example.test', { revoked_at: new Date('2026-03-02T10:00:00Z') });

    expect((await runReminders(db, { now: at('2026-03-08T09:59:00Z'), env })).invitationPending).toEqual({});
    expect((await runReminders(db, { now: at('2026-03-08T10:00:00Z'), env })).invitationPending).toEqual({
      immediate: 2,
    });
    const byTo = await outboxByRecipient(db, 'reminder_invitation_pending');
    expect([...byTo.keys()].sort()).toEqual([c.lead.email, 'second-lead@valley.example'].sort());
    expect(byTo.get(c.lead.email)![0]!.idempotency_key).toBe(`reminder:invitation:${waiting.id}:${c.lead.id}`);
    expect(byTo.get(c.lead.email)![0]!.text_body).toContain('newcomer@example.test');
    await runReminders(db, { now: at('2026-03-09T10:00:00Z'), env });
    // After its expiry it is not reminded again either: the key is the invitation's.
    await runReminders(db, { now: at('2026-03-20T10:00:00Z'), env });
    expect(await countKind('reminder_invitation_pending')).toBe(2);
  });
});

describe('unsubscribe', () => {
  test('the link stops that kind of message from that crew for that user, and nothing else', async () => {
    const c = await makeAlertCrew(db);
    // The rider also rides with a second crew of their own.
    const own = await db.insertInto('crews').values({ name: 'Own bikes' }).returning('id').executeTakeFirstOrThrow();
    await addMember(db, own.id, c.rider.id, 'lead');
    const ownMachine = await makeMachine(db, own.id, c.rider.id, { name: 'Tourer 1200' } as never);

    await giveIntervalCall(db, c, { on: '2026-06-01' });
    await runReminders(db, { now: at('2026-06-01'), env });
    const first = (await outboxByRecipient(db, 'reminder_sample_due')).get(c.rider.email)![0]!;
    const result = await applyUnsubscribe(db, tokenFromHeaders(first.headers), env.secret);
    expect(result).toMatchObject({ ok: true, what: 'next-sample-due reminders of Valley school' });
    // Clicking twice is harmless.
    expect((await applyUnsubscribe(db, tokenFromHeaders(first.headers), env.secret)).ok).toBe(true);

    // Then: a new target in Valley school, a shipped bottle in Valley school, a due machine in the rider's own crew.
    await giveIntervalCall(db, c, { on: '2026-09-01' });
    await shipSample(db, c, 'SW-LATE', '2026-08-01T10:00:00Z');
    await giveIntervalCall(db, { crewId: own.id, machineId: ownMachine.id, rider: c.rider }, { on: '2026-09-01' });
    // A bottle on its way holds back the due reminder, so it counts as back for the first run and as shipped for the second.
    await db.updateTable('samples').set({ state: 'reviewed' }).where('bottle_code', '=', 'SW-LATE').execute();
    await runReminders(db, { now: at('2026-09-01'), env });
    await db.updateTable('samples').set({ state: 'shipped' }).where('bottle_code', '=', 'SW-LATE').execute();
    await runReminders(db, { now: at('2026-09-02'), env });

    const rows = await db
      .selectFrom('mail_outbox')
      .select(['to_address', 'kind', 'idempotency_key'])
      .where('to_address', '=', c.rider.email)
      .execute();
    const riderDue = rows.filter((r) => r.kind === 'reminder_sample_due').map((r) => r.idempotency_key);
    // Valley school's second due date: not to the rider. Their own crew's machine: still.
    expect(riderDue).toEqual([first.idempotency_key, `reminder:sample-due:${ownMachine.id}:2026-09-01:${c.rider.id}`]);
    // Another kind from the same crew still reaches them.
    expect(rows.filter((r) => r.kind === 'reminder_shipped_overdue')).toHaveLength(1);
    // And the mechanic and lead still get Valley school's due reminder.
    const valleyDue = await db
      .selectFrom('mail_outbox')
      .select('to_address')
      .where('idempotency_key', 'like', `reminder:sample-due:${c.machineId}:2026-09-01:%`)
      .execute();
    expect(valleyDue.map((r) => r.to_address).sort()).toEqual([c.lead.email, c.mechanic.email].sort());
  });

  test.each([
    ['a forged token', 'eyJ4IjoxfQ.c2lnbmF0dXJl'],
    ['an empty token', ''],
  ])('%s changes nothing', async (_name, token) => {
    await makeAlertCrew(db);
    expect(await applyUnsubscribe(db, token, env.secret)).toEqual({ ok: false });
    expect(await db.selectFrom('notification_preferences').select('user_id').execute()).toHaveLength(0);
  });
});
