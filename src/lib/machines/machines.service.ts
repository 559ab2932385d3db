import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { canCreateMachine, canEditMachine, canReadCrew } from '../auth/permissions';
import { toStoredMeter, type TemperatureUnit } from '../units/units';
import { machineInputSchema, parseGradeRows, toMachine, type Machine } from './machines';
import {
  countMachineRecords,
  deleteMachineRow,
  findMachineOfCrew,
  findMachinesOfCrew,
  insertMachine,
  updateMachineRow,
} from './machines.repository';
import { refuse, refuseInvalid, refuseNotFound, succeed, type Result } from '~/lib/http/result';
import type { Actor } from '~/lib/auth/types';
import { formatCount } from '../words/words';

/** The crew's machines for a member (archived ones too when asked). */
export async function listMachines(
  db: Kysely<Database>,
  actor: Actor,
  options: { includeArchived?: boolean } = {},
): Promise<Machine[]> {
  if (!canReadCrew(actor.membership)) return [];
  return (await findMachinesOfCrew(db, actor.membership.crewId, options)).map(toMachine);
}

/** One machine of the actor's crew, or a 404 refusal. */
export async function getMachine(db: Kysely<Database>, actor: Actor, id: string): Promise<Result<Machine>> {
  if (!canReadCrew(actor.membership)) return refuseNotFound('machine');
  const row = await findMachineOfCrew(db, actor.membership.crewId, id);
  return row ? succeed(toMachine(row)) : refuseNotFound('machine');
}

/** True when the actor may change this machine and its records (oil changes, drain cards, wear parts). */
export function canActorEdit(actor: Actor, machine: Machine): boolean {
  return canEditMachine(actor.membership, { ownerUserId: machine.ownerUserId }, actor.userId);
}

function validate(input: unknown, temperatureUnit: TemperatureUnit) {
  const parsed = machineInputSchema.safeParse(input);
  if (!parsed.success) return { ok: false as const, refusal: refuseInvalid(parsed.error) };
  const grades = parseGradeRows(parsed.data.grades, temperatureUnit);
  if (!grades.ok)
    return { ok: false as const, refusal: refuse(400, 'invalid_input', 'Some fields need attention.', grades.fields) };
  const d = parsed.data;
  return {
    ok: true as const,
    values: {
      name: d.name,
      model_year: d.modelYear ?? null,
      engine_layout: d.engineLayout,
      displacement_cc: d.displacementCc ?? null,
      cooling: d.cooling,
      shared_oil: d.sharedOil,
      oil_capacity_l: d.oilCapacityL ?? null,
      meter: d.meter,
      recommended_grades: JSON.stringify(grades.grades),
      max_interval_distance: d.maxInterval === undefined ? null : toStoredMeter(d.maxInterval, d.meter),
      max_interval_days: d.maxIntervalDays ?? null,
      notes: d.notes,
    },
  };
}

/** Adds a machine owned by the actor; temperatures arrive in the actor's unit. */
export async function createMachine(
  db: Kysely<Database>,
  actor: Actor,
  input: unknown,
  temperatureUnit: TemperatureUnit,
): Promise<Result<Machine>> {
  if (!canCreateMachine(actor.membership))
    return refuse(403, 'forbidden', 'Your role in this crew does not add machines.');
  const v = validate(input, temperatureUnit);
  if (!v.ok) return v.refusal;
  const row = await insertMachine(db, { ...v.values, crew_id: actor.membership.crewId, owner_user_id: actor.userId });
  return succeed(toMachine(row));
}

/** Changes a machine's details. Switching the meter unit is refused once readings exist (they would change meaning). */
export async function updateMachine(
  db: Kysely<Database>,
  actor: Actor,
  id: string,
  input: unknown,
  temperatureUnit: TemperatureUnit,
): Promise<Result<Machine>> {
  const found = await getMachine(db, actor, id);
  if (!found.ok) return found;
  if (!canActorEdit(actor, found.value))
    return refuse(403, 'forbidden', 'Only the machine’s rider or a crew lead can change it.');
  const v = validate(input, temperatureUnit);
  if (!v.ok) return v.refusal;
  if (v.values.meter !== found.value.meter && (v.values.meter === 'h') !== (found.value.meter === 'h')) {
    const counts = await countMachineRecords(db, id);
    if (counts.oilChanges + counts.samples > 0) {
      return refuse(400, 'invalid_input', 'Some fields need attention.', {
        meter: 'Hours and distances cannot be mixed once oil changes are logged.',
      });
    }
  }
  const row = await updateMachineRow(db, actor.membership.crewId, id, v.values);
  return row ? succeed(toMachine(row)) : refuseNotFound('machine');
}

/** Archives (hides) or restores a machine; its records stay. */
export async function setMachineArchived(
  db: Kysely<Database>,
  actor: Actor,
  id: string,
  archived: boolean,
): Promise<Result<Machine>> {
  const found = await getMachine(db, actor, id);
  if (!found.ok) return found;
  if (!canActorEdit(actor, found.value))
    return refuse(403, 'forbidden', 'Only the machine’s rider or a crew lead can archive it.');
  const row = await updateMachineRow(db, actor.membership.crewId, id, { archived_at: archived ? new Date() : null });
  return row ? succeed(toMachine(row)) : refuseNotFound('machine');
}

/** Deletes a machine only when no sample or oil change hangs from it; otherwise asks to archive instead. */
const DELETE_FORBIDDEN = 'Only the machine’s rider or a crew lead can delete it.';

/** Why a machine with history cannot be deleted (null when it can): the same words the refusal uses. */
function deletionBlockedBy(counts: { samples: number; oilChanges: number }): string | null {
  if (counts.samples + counts.oilChanges === 0) return null;
  return `This machine has ${formatCount(counts.oilChanges, 'oil change')} and ${formatCount(counts.samples, 'sample')}; archive it instead so its history stays.`;
}

/**
 * Whether the actor could delete the machine now, and if not why, so the edit page can show a disabled button
 * with its reason instead of a button that only refuses after the click.
 */
export async function describeMachineDeletion(
  db: Kysely<Database>,
  actor: Actor,
  id: string,
): Promise<Result<{ allowed: boolean; reason: string | null }>> {
  const found = await getMachine(db, actor, id);
  if (!found.ok) return found;
  const reason = !canActorEdit(actor, found.value)
    ? DELETE_FORBIDDEN
    : deletionBlockedBy(await countMachineRecords(db, id));
  return succeed({ allowed: reason === null, reason });
}

export async function deleteMachine(
  db: Kysely<Database>,
  actor: Actor,
  id: string,
): Promise<Result<{ deleted: true }>> {
  const found = await getMachine(db, actor, id);
  if (!found.ok) return found;
  if (!canActorEdit(actor, found.value)) return refuse(403, 'forbidden', DELETE_FORBIDDEN);
  return db.transaction().execute(async (trx) => {
    const reason = deletionBlockedBy(await countMachineRecords(trx, id));
    if (reason) return refuse(409, 'has_records', reason);
    await deleteMachineRow(trx, actor.membership.crewId, id);
    return succeed({ deleted: true as const });
  });
}
