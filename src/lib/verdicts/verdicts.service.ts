/** The verdicts a crew member may read, for the lists and pages that lead with the decision. */
import type { Kysely } from 'kysely';
import { canReadCrew } from '../auth/permissions';
import type { Actor } from '../auth/types';
import type { Database } from '../db/database';
import { listMachineVerdicts, listSampleVerdicts } from './verdicts.repository';
import type { Verdict } from './verdicts';

/** The verdict of each sample with results among `sampleIds`, by sample id. */
export async function loadSampleVerdicts(
  db: Kysely<Database>,
  actor: Actor,
  sampleIds: readonly string[],
): Promise<Map<string, Verdict>> {
  if (!canReadCrew(actor.membership)) return new Map();
  return listSampleVerdicts(db, actor.membership.crewId, sampleIds);
}

/** The verdict of each machine's latest sample with results, by machine id. */
export async function loadMachineVerdicts(
  db: Kysely<Database>,
  actor: Actor,
  machineIds: readonly string[],
): Promise<Map<string, Verdict>> {
  if (!canReadCrew(actor.membership)) return new Map();
  return listMachineVerdicts(db, actor.membership.crewId, machineIds);
}
