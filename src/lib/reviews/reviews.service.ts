/** Review rules: who may write, confirm keeps the current call, override needs a note; each decision is one transaction. */
import type { Kysely, Transaction } from 'kysely';
import { canConfirmSteadyCalls, canReviewSample } from '../auth/permissions';
import type { Actor as AuthActor, CrewMembership } from '../auth/types';
import { refuse, succeed, type Refusal, type Result } from '../http/result';
import type { Database } from '../db/database';
import { toStoredMeter } from '../units/units';
import {
  STEADY_BATCH_MAX,
  UNDO_SECONDS,
  type BaselineChoice,
  type CallDecision,
  type CallHistoryEntry,
  type ReviewNote,
} from './reviews';
import { recordAuditEvent } from '../audit/audit.repository';
import { recomputeFindings } from '../findings/findings.service';
import {
  findBaselineStatus,
  findReviewSample,
  insertIntervalCall,
  updateSampleBaseline,
  insertReviewNote,
  listCallHistory,
  listReviewNotes,
  deleteIntervalCalls,
  findOwnConfirmations,
} from './reviews.repository';
import { recordSampleState, recordSampleStates } from '../samples/sample-lifecycle';
import { lockSampleStates } from '../samples/samples.repository';
import { listSteadyReviewQueue } from '../verdicts/verdicts.repository';

/** A member of the crew in question, or a signed-in user with no crew (who gets not found). */
type Actor = AuthActor<CrewMembership | null>;

const notFound = () => refuse(404, 'not_found', 'No such sample in this crew.');

/** Everything the review panel shows: the call history (newest first) and the notes (oldest first). */
export async function loadSampleReview(db: Kysely<Database>, crewId: string, sampleId: string) {
  const sample = await findReviewSample(db, crewId, sampleId);
  if (!sample) return null;
  const [calls, notes] = await Promise.all([listCallHistory(db, sampleId), listReviewNotes(db, crewId, sampleId)]);
  return { sample, calls, notes, current: calls[0] ?? null };
}

/** Adds a mechanic's or lead's note to a sample. */
export async function addReviewNote(
  db: Kysely<Database>,
  actor: Actor,
  sampleId: string,
  body: string,
): Promise<Result<{ id: string }>> {
  if (!actor.membership) return notFound();
  const sample = await findReviewSample(db, actor.membership.crewId, sampleId);
  if (!sample) return notFound();
  if (!canReviewSample(actor.membership))
    return refuse(403, 'forbidden', 'Only a lead or a mechanic of the crew writes review notes.');
  const id = await insertReviewNote(db, sampleId, actor.userId, body);
  return succeed({ id });
}

/**
 * Confirms or overrides the sample's current interval call. Confirm copies the current call as the reviewer's;
 * override writes the reviewer's call with their note as its reason. Either marks the sample reviewed.
 */
export async function decideIntervalCall(
  db: Kysely<Database>,
  actor: Actor,
  sampleId: string,
  decision: CallDecision,
): Promise<Result<{ id: string; entry: CallHistoryEntry }>> {
  if (!actor.membership) return notFound();
  const membership = actor.membership;
  return db.transaction().execute((trx) => decideInTransaction(trx, { ...actor, membership }, sampleId, decision));
}

/** decideIntervalCall inside the caller's transaction: one review, the same whether alone or one of many. */
async function decideInTransaction(
  trx: Transaction<Database>,
  actor: AuthActor<CrewMembership>,
  sampleId: string,
  decision: CallDecision,
): Promise<Result<{ id: string; entry: CallHistoryEntry }>> {
  const membership = actor.membership;
  const crewId = membership.crewId;
  {
    const sample = await findReviewSample(trx, crewId, sampleId);
    if (!sample) return notFound();
    if (!canReviewSample(membership))
      return refuse(403, 'forbidden', 'Only a lead or a mechanic of the crew confirms or overrides a call.');
    if (sample.state === 'drawn' || sample.state === 'shipped') {
      return refuse(409, 'no_results', 'This sample has no results yet, so there is no call to decide.');
    }
    const history = await listCallHistory(trx, sampleId);
    const current = history[0];
    let id: string;
    if (decision.action === 'confirm') {
      if (!current)
        return refuse(
          409,
          'no_call',
          'There is no interval call to confirm yet; override it with your own call instead.',
        );
      id = await insertIntervalCall(trx, {
        sampleId,
        machineId: sample.machine_id,
        call: current.call,
        source: 'confirmed',
        nextInterval: current.nextInterval,
        nextSampleOdometer: current.nextSampleOdometer,
        nextSampleOn: current.nextSampleOn,
        reasons: current.reasons,
        note: decision.note,
        madeBy: actor.userId,
      });
    } else {
      const meter = sample.meter;
      id = await insertIntervalCall(trx, {
        sampleId,
        machineId: sample.machine_id,
        call: decision.call,
        source: 'override',
        nextInterval:
          decision.nextInterval !== undefined
            ? toStoredMeter(decision.nextInterval, meter)
            : (current?.nextInterval ?? null),
        nextSampleOdometer:
          decision.nextSampleOdometer !== undefined
            ? toStoredMeter(decision.nextSampleOdometer, meter)
            : (current?.nextSampleOdometer ?? null),
        nextSampleOn: decision.nextSampleOn ?? current?.nextSampleOn ?? null,
        reasons: [decision.note],
        note: decision.note,
        madeBy: actor.userId,
      });
    }
    // A second decision on a reviewed sample keeps it reviewed, with no second event.
    await recordSampleState(
      trx,
      sampleId,
      'reviewed',
      actor.userId,
      decision.action === 'confirm' ? 'Interval call confirmed.' : 'Interval call overridden.',
    );
    const entry = (await listCallHistory(trx, sampleId)).find((c) => c.id === id)!;
    return succeed({ id, entry });
  }
}

// The server allows a little more than the notice shows, for the round trip of a click at the last second.
const UNDO_GRACE_SECONDS = 5;

/** A refusal thrown inside a transaction, so nothing of it is kept. */
class RollBack extends Error {
  constructor(readonly refusal: Refusal) {
    super(refusal.message);
  }
}

/**
 * Confirms every steady hold or stretch call waiting for review, each exactly as one confirm (its own confirmed
 * call and its sample reviewed, with the sample's event), in one transaction; logged in the crew's audit log.
 * Returns the new calls' ids, which undoSteadyConfirmations takes back within UNDO_SECONDS.
 */
export async function confirmSteadyCalls(
  db: Kysely<Database>,
  actor: Actor,
): Promise<Result<{ confirmed: number; callIds: string[]; sampleIds: string[] }>> {
  if (!actor.membership) return notFound();
  const membership = actor.membership;
  if (!canConfirmSteadyCalls(membership))
    return refuse(403, 'forbidden', 'Only a lead or a mechanic of the crew confirms interval calls.');
  try {
    return await db.transaction().execute(async (trx) => {
      const queued = await listSteadyReviewQueue(trx, membership.crewId, STEADY_BATCH_MAX);
      // Locked first: a second click (or a colleague's) waits, then finds these reviewed and leaves them.
      const waiting = (await lockSampleStates(trx, queued)).filter((s) => s.state === 'results_in').map((s) => s.id);
      const callIds: string[] = [];
      for (const sampleId of waiting) {
        const r = await decideInTransaction(trx, { ...actor, membership }, sampleId, { action: 'confirm', note: '' });
        if (!r.ok) throw new RollBack(r);
        callIds.push(r.value.id);
      }
      if (waiting.length > 0)
        await recordAuditEvent(trx, {
          kind: 'steady_calls_confirmed',
          crewId: membership.crewId,
          actorUserId: actor.userId,
          detail: { count: waiting.length, sampleIds: waiting },
        });
      return succeed({ confirmed: waiting.length, callIds, sampleIds: waiting });
    });
  } catch (e) {
    if (e instanceof RollBack) return e.refusal;
    throw e;
  }
}

/**
 * Takes back the reviewer's own confirmations of one step, within UNDO_SECONDS: the confirmed calls go and the
 * samples return to "results in" through the sample lifecycle, all or nothing, in one transaction.
 */
export async function undoSteadyConfirmations(
  db: Kysely<Database>,
  actor: Actor,
  callIds: readonly string[],
): Promise<Result<{ undone: number }>> {
  if (!actor.membership) return notFound();
  const membership = actor.membership;
  if (!canConfirmSteadyCalls(membership))
    return refuse(403, 'forbidden', 'Only a lead or a mechanic of the crew confirms interval calls.');
  const ids = [...new Set(callIds)];
  try {
    return await db.transaction().execute(async (trx) => {
      const found = await findOwnConfirmations(
        trx,
        membership.crewId,
        actor.userId,
        ids,
        UNDO_SECONDS + UNDO_GRACE_SECONDS,
      );
      if (found.length !== ids.length)
        throw new RollBack(refuse(404, 'not_found', 'No such confirmations of yours in this crew.'));
      if (found.some((c) => !c.fresh))
        throw new RollBack(
          refuse(409, 'undo_expired', 'The time to undo has passed: open a sample to change its call.'),
        );
      if (found.some((c) => !c.current))
        throw new RollBack(refuse(409, 'changed', 'A call was changed since; open that sample to change it.'));
      const sampleIds = found.map((c) => c.sample_id);
      await lockSampleStates(trx, sampleIds);
      await deleteIntervalCalls(trx, ids);
      await recordSampleStates(trx, sampleIds, 'results_in', actor.userId, 'Confirmation undone.');
      await recordAuditEvent(trx, {
        kind: 'steady_calls_unconfirmed',
        crewId: membership.crewId,
        actorUserId: actor.userId,
        detail: { count: sampleIds.length, sampleIds },
      });
      return succeed({ undone: sampleIds.length });
    });
  } catch (e) {
    if (e instanceof RollBack) return e.refusal;
    throw e;
  }
}

/**
 * Takes a sample out of its machine's baseline (or puts it back) with the reviewer's reason, logs it in the crew's
 * audit log, and judges that sample and every later one of the machine again, in one transaction.
 */
export async function changeSampleBaseline(
  db: Kysely<Database>,
  actor: Actor & { ip?: string | null },
  sampleId: string,
  choice: BaselineChoice,
): Promise<Result<{ inBaseline: boolean; findingsWritten: number }>> {
  if (!actor.membership) return notFound();
  const membership = actor.membership;
  return db.transaction().execute(async (trx): Promise<Result<{ inBaseline: boolean; findingsWritten: number }>> => {
    const sample = await findReviewSample(trx, membership.crewId, sampleId);
    if (!sample) return notFound();
    if (!canReviewSample(membership)) {
      return refuse(
        403,
        'forbidden',
        'Only a lead or a mechanic of the crew takes samples out of the baseline or puts them back.',
      );
    }
    const inBaseline = choice.action === 'include';
    await updateSampleBaseline(trx, sampleId, {
      inBaseline,
      note: choice.reason,
      breakIn: !inBaseline && choice.breakIn,
      userId: actor.userId,
    });
    await recordAuditEvent(trx, {
      kind: inBaseline ? 'baseline_restored' : 'baseline_excluded',
      crewId: membership.crewId,
      actorUserId: actor.userId,
      detail: {
        sampleId,
        bottleCode: sample.bottle_code,
        machine: sample.machine_name,
        reason: choice.reason,
        breakIn: !inBaseline && choice.breakIn,
      },
      ip: actor.ip ?? null,
    });
    const findingsWritten = await recomputeFindings(trx, sampleId);
    return succeed({ inBaseline, findingsWritten });
  });
}

/** Whether a sample of the crew counts in its machine's baseline (null for another crew's or an unknown sample). */
export async function loadBaselineStatus(db: Kysely<Database>, crewId: string, sampleId: string) {
  return (await findBaselineStatus(db, crewId, sampleId)) ?? null;
}

export type { ReviewNote };
