/** Reads everything a machine's printable history shows, for a machine the actor's crew may read. */
import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import type { Actor } from '../auth/types';
import type { Machine } from '../machines/machines';
import { toOilChange } from '../oil-changes/oil-changes';
import { findOilChangesOfMachine } from '../oil-changes/oil-changes.repository';
import { listWearPartDetails } from '../wear-parts/wear-parts.service';
import { buildMachineHistory, HISTORY_MEASURANDS, type MachineHistoryView } from './machine-history';
import {
  findHistoryCalls,
  findHistoryFindings,
  findHistoryReadings,
  findHistorySamples,
} from './machine-history.repository';

/** The history view model of a machine already loaded for the actor (getMachine), printed today unless told. */
export async function loadMachineHistory(
  db: Kysely<Database>,
  actor: Actor,
  machine: Machine,
  lengthUnit: 'in' | 'mm',
  printedOn = new Date().toISOString().slice(0, 10),
): Promise<MachineHistoryView> {
  const crewId = actor.membership.crewId;
  const [changes, samples, parts] = await Promise.all([
    findOilChangesOfMachine(db, crewId, machine.id),
    findHistorySamples(db, crewId, machine.id),
    listWearPartDetails(db, actor, machine),
  ]);
  const ids = samples.map((s) => s.id);
  const [readings, findings, calls] = await Promise.all([
    findHistoryReadings(db, ids, HISTORY_MEASURANDS),
    findHistoryFindings(db, ids),
    findHistoryCalls(db, crewId, ids),
  ]);
  return buildMachineHistory({
    machine,
    lengthUnit,
    oilChanges: changes.map((r) => toOilChange(r)),
    samples,
    readings,
    findings,
    calls,
    parts,
    printedOn,
  });
}
