/** Review rules: who may write, confirm keeps the current call, override needs a note; each decision is one transaction. */
import type { Kysely } from 'kysely';
import { canReviewSample } from '../auth/permissions';
import type { Actor as AuthActor, CrewMembership } from '../auth/types';
import { refuse, succeed, type Result } from '../http/result';
import type { Database } from '../db/database';
import { toStoredMeter } from '../units/units';
import type { BaselineChoice, CallDecision, CallHistoryEntry, ReviewNote } from './reviews';
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
} from './reviews.repository';
import { recordSampleState } from '../samples/sample-lifecycle';

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
  const crewId = actor.membership.crewId;
  const membership = actor.membership;
  return db.transaction().execute(async (trx): Promise<Result<{ id: string; entry: CallHistoryEntry }>> => {
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
  });
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
