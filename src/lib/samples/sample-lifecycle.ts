/**
 * The one place a sample's state changes. A sample is drawn (a drain card, or a lab row for an unregistered
 * bottle), shipped to the lab, gets results from a lab import, and is reviewed by a mechanic or lead. Each
 * change writes the new state and a sample event (who, when, why) in the caller's transaction.
 */
import type { Kysely, Transaction } from 'kysely';
import type { Database, SampleState } from '../db/database';
import { insertSampleEvents, lockSampleStates, setSampleState } from './samples.repository';

type Db = Kysely<Database> | Transaction<Database>;

/**
 * For each state, the states a sample may come from. 'drawn' is only ever the first state (see recordSampleDrawn).
 * Results may arrive again on a sample that has them (a lab's corrected report, imported with "replace"), which
 * also takes a reviewed sample back to "results in": the new figures have not been reviewed yet.
 */
export const SAMPLE_TRANSITIONS: Readonly<Record<SampleState, readonly SampleState[]>> = {
  drawn: [],
  shipped: ['drawn'],
  results_in: ['drawn', 'shipped', 'results_in', 'reviewed'],
  reviewed: ['results_in'],
};

/** Whether a sample in state `from` may move to `to`. */
export function canMoveSample(from: SampleState, to: SampleState): boolean {
  return SAMPLE_TRANSITIONS[to].includes(from);
}

/** Records the first state of a sample just created from a drain card. */
export async function recordSampleDrawn(trx: Db, sampleId: string, actorUserId: string | null): Promise<void> {
  await insertSampleEvents(trx, [sampleId], 'drawn', '', actorUserId);
}

/**
 * Moves samples to `to` where SAMPLE_TRANSITIONS allows it, each with a sample event carrying `note` (for
 * 'shipped', the note is also the sample's tracking note). The rows are locked first, so two moves of one
 * sample run one after the other. Returns the ids that moved; the others are left as they were.
 */
export async function recordSampleStates(
  trx: Db,
  sampleIds: readonly string[],
  to: SampleState,
  actorUserId: string | null,
  note = '',
): Promise<string[]> {
  if (sampleIds.length === 0) return [];
  const current = await lockSampleStates(trx, sampleIds);
  const moving = current.filter((s) => canMoveSample(s.state, to)).map((s) => s.id);
  if (moving.length === 0) return [];
  await setSampleState(trx, moving, to, to === 'shipped' ? note : undefined);
  await insertSampleEvents(trx, moving, to, note, actorUserId);
  return moving;
}

/** Moves one sample to `to` (see recordSampleStates); false when the move is not allowed or the sample is gone. */
export async function recordSampleState(
  trx: Db,
  sampleId: string,
  to: SampleState,
  actorUserId: string | null,
  note = '',
): Promise<boolean> {
  return (await recordSampleStates(trx, [sampleId], to, actorUserId, note)).length === 1;
}
