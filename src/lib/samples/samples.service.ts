import type { Kysely, Transaction } from 'kysely';
import type { Database, SampleState } from '../db/database';
import { canCreateMachine, canReadCrew } from '../auth/permissions';
import { canActorEdit, getMachine } from '../machines/machines.service';
import { refuse, refuseInvalid, refuseNotFound, succeed, type FieldErrors, type Result } from '~/lib/http/result';
import type { Actor } from '~/lib/auth/types';
import { explainAbsurdOdometer, toOilChange, type OilChange } from '../oil-changes/oil-changes';
import {
  findLatestOilChange,
  findOilChangeOfCrew,
  findOilChangesOfMachine,
} from '../oil-changes/oil-changes.repository';
import { parseSaeGrade } from '../oil-changes/sae-grade';
import { formatMeter, toStoredMeter } from '../units/units';
import { explainIssuedCode, generateIssuedCode, normaliseBottleCode } from './bottle-code';
import { findNewOilBottles } from '../new-oil/new-oil.service';
import { drainCardSchema, shipSchema, toSample, type Sample } from './samples';
import { recordSampleDrawn, recordSampleState } from './sample-lifecycle';
import { drainCardOdometerPrefill, estimateCurrentOdometer } from '../home/odometer-estimate';
import { listOdometerHistory } from '../overview/overview.repository';
import { formatDay } from '../words/dates';
import {
  countSamplesByState,
  findSampleByBottleCode,
  findSampleByClientKey,
  findSampleEvents,
  findSampleOfCrew,
  findSamplesOfCrew,
  findSamplesOfMachine,
  findUnusedReservedCodes,
  insertSample,
  reserveBottleCode,
} from './samples.repository';

type Db = Kysely<Database> | Transaction<Database>;

/** What a drain card is prefilled with: the latest oil change's grade, product, volume and odometer. */
export interface DrainCardPrefill {
  latest: OilChange | null;
  /** The odometer is an estimate from recent riding (never the oil change's reading), or null. */
  values: { saeGrade: string; oilProduct: string; odometer: number | null; volumeL: number | null };
}

/** The prefill for a machine's drain card (the odometer in the stored unit); `today` is YYYY-MM-DD. */
export async function prefillDrainCard(
  db: Kysely<Database>,
  actor: Actor,
  machineId: string,
  today = new Date().toISOString().slice(0, 10),
): Promise<DrainCardPrefill> {
  const row = await findLatestOilChange(db, actor.membership.crewId, machineId);
  const latest = row ? toOilChange(row) : null;
  const history = (await listOdometerHistory(db, [machineId])).get(machineId) ?? [];
  const odometer = drainCardOdometerPrefill(estimateCurrentOdometer(history, today), latest?.odometer ?? null, today);
  return {
    latest,
    values: {
      saeGrade: latest?.saeGrade ?? '',
      oilProduct: latest?.oilProduct ?? '',
      odometer,
      volumeL: latest?.volumeL ?? null,
    },
  };
}

/**
 * The oil change the drained oil came from: the latest one on or before the day whose reading is below the
 * sample's. A sample at exactly a change's reading was drawn as that change drained the oil, so it belongs
 * to the change before (unless the meter was replaced in between).
 */
export function pickOilChangeOfSample(
  changesOldestFirst: readonly OilChange[],
  drawnOn: string,
  odometer: number,
): OilChange | null {
  const eligible = changesOldestFirst.filter((c) => c.changedOn <= drawnOn);
  for (let i = eligible.length - 1; i >= 0; i--) {
    const c = eligible[i]!;
    if (c.odometer < odometer) return c;
    if (c.meterReplaced) return null;
  }
  return null;
}

/**
 * A fresh Sumpwise bottle code (normal form), reserved for the actor so it is never issued again, to this
 * device or any other. The online "issue a code" button uses the device key 'online'.
 */
export async function issueBottleCode(db: Db, actor: Actor, deviceKey = 'online'): Promise<string> {
  for (let attempt = 0; attempt < 20; attempt++) {
    const code = generateIssuedCode();
    if (await reserveBottleCode(db, { crewId: actor.membership.crewId, userId: actor.userId, deviceKey, code }))
      return code;
  }
  throw new Error('Could not find an unused bottle code.');
}

/** Codes one device holds for use without a network. */
export const RESERVED_BLOCK_SIZE = 10;
/** Unused reserved codes one rider may hold in a crew over all devices (five phones' worth). */
export const RESERVED_PER_RIDER = 5 * RESERVED_BLOCK_SIZE;
/**
 * Days a reserved code counts toward RESERVED_PER_RIDER. A phone that was lost, replaced or wiped keeps its block
 * reserved for good (no code is ever issued twice), but after this long the block no longer stands in the way of
 * the rider's next device (common practice for an abuse guard, no published source).
 */
export const RESERVED_COUNT_DAYS = 90;

/**
 * Tops up a device's block of reserved bottle codes to RESERVED_BLOCK_SIZE and answers the whole block
 * (codes already handed out and still unused come back, so a device that lost its copy gets them again).
 */
export async function reserveBottleCodes(
  db: Kysely<Database>,
  actor: Actor,
  deviceKey: string,
): Promise<Result<{ codes: string[] }>> {
  if (!canCreateMachine(actor.membership))
    return refuse(403, 'forbidden', 'Your role in this crew does not register samples.');
  const { crewId } = actor.membership;
  const held = await findUnusedReservedCodes(db, crewId, actor.userId, { deviceKey });
  const missing = RESERVED_BLOCK_SIZE - held.length;
  if (missing > 0) {
    const since = new Date(Date.now() - RESERVED_COUNT_DAYS * 86_400_000);
    const recent = await findUnusedReservedCodes(db, crewId, actor.userId, { since });
    if (recent.length + missing > RESERVED_PER_RIDER) {
      return refuse(
        409,
        'too_many_reserved',
        `You already hold ${recent.length} unused bottle codes reserved on other devices in the last ${RESERVED_COUNT_DAYS} days; use those first. A device's codes stop counting ${RESERVED_COUNT_DAYS} days after it was given them.`,
      );
    }
    for (let i = 0; i < missing; i++) held.push(await issueBottleCode(db, actor, deviceKey));
  }
  return succeed({ codes: held });
}

export type DrainCardOutcome = { sample: Sample; repeated: boolean };

/**
 * Registers a drain card: checks the bottle code (an issued one by its check character), its uniqueness in
 * the crew, and the odometer against the oil change; computes the distance on oil; records the 'drawn'
 * state. A card sent twice with the same client key answers the first sample and writes nothing new.
 */
export async function registerDrainCard(
  db: Kysely<Database>,
  actor: Actor,
  machineId: string,
  input: unknown,
): Promise<Result<DrainCardOutcome>> {
  const m = await getMachine(db, actor, machineId);
  if (!m.ok) return m;
  const machine = m.value;
  if (!canActorEdit(actor, machine))
    return refuse(403, 'forbidden', 'Only the machine’s rider or a crew lead can register its samples.');
  const crewId = actor.membership.crewId;

  const parsed = drainCardSchema.safeParse(input);
  if (parsed.success && parsed.data.clientKey) {
    const again = await findSampleByClientKey(db, crewId, parsed.data.clientKey);
    if (again) {
      if (again.machine_id !== machineId)
        return refuse(409, 'client_key_reused', 'This card key belongs to another sample.');
      return succeed({ sample: toSample(again), repeated: true });
    }
  }
  const fields: FieldErrors = parsed.success ? {} : refuseInvalid(parsed.error).fields;
  const raw = (input ?? {}) as Record<string, unknown>;
  const gradeText = String(raw['saeGrade'] ?? '').trim();
  const grade = gradeText === '' ? null : parseSaeGrade(gradeText);
  if (grade && !grade.ok) fields['saeGrade'] = grade.message;
  if (!parsed.success || (grade && !grade.ok))
    return refuse(400, 'invalid_input', 'Some fields need attention.', fields);
  const d = parsed.data;

  const norm = normaliseBottleCode(d.bottleCode);
  if (d.codeSource === 'issued') {
    const why = explainIssuedCode(norm);
    if (why) return refuse(400, 'invalid_input', 'Some fields need attention.', { bottleCode: why });
  } else if (!/^[A-Z0-9]{3,32}$/.test(norm)) {
    return refuse(400, 'invalid_input', 'Some fields need attention.', {
      bottleCode: 'Use 3 to 32 letters and digits, as printed on the lab kit.',
    });
  }
  const odometer = toStoredMeter(d.odometer, machine.meter);
  const absurd = explainAbsurdOdometer(odometer, machine.meter);
  if (absurd) return refuse(400, 'invalid_input', 'Some fields need attention.', { odometer: absurd });

  const changes = (await findOilChangesOfMachine(db, crewId, machineId)).map((r) => toOilChange(r));
  const change = pickOilChangeOfSample(changes, d.drawnOn, odometer);
  const firstOnDay = changes.filter((c) => c.changedOn <= d.drawnOn).at(-1);
  if (!change && firstOnDay && firstOnDay.odometer > odometer && !firstOnDay.meterReplaced) {
    return refuse(400, 'invalid_input', 'Some fields need attention.', {
      odometer: `Lower than at the oil change on ${formatDay(firstOnDay.changedOn)} (${formatMeter(firstOnDay.odometer, machine.meter)}).`,
    });
  }
  const distanceOnOil = change ? odometer - change.odometer : null;

  try {
    return await db.transaction().execute(async (trx) => {
      const taken = await findSampleByBottleCode(trx, crewId, norm);
      if (taken) {
        return refuse(409, 'duplicate_bottle_code', 'That bottle code is already used.', {
          bottleCode: `Bottle code ${d.bottleCode} is already on a sample of ${taken.machine_name} drawn on ${formatDay(taken.drawn_on)}. Each bottle needs its own code.`,
        });
      }
      const newOilBottle = (await findNewOilBottles(trx, crewId, [norm])).get(norm);
      if (newOilBottle) {
        return refuse(409, 'duplicate_bottle_code', 'That bottle code is already used.', {
          bottleCode: `Bottle code ${d.bottleCode} is the bottle of new oil registered for “${newOilBottle.productName}”. Each bottle needs its own code.`,
        });
      }
      const row = await insertSample(trx, {
        crew_id: crewId,
        machine_id: machineId,
        oil_change_id: change?.id ?? null,
        bottle_code: d.bottleCode.toUpperCase(),
        bottle_code_norm: norm,
        issued_code: d.codeSource === 'issued',
        drawn_on: d.drawnOn,
        odometer,
        distance_on_oil: distanceOnOil,
        top_up_l: d.topUpL ?? 0,
        sae_grade: grade && grade.ok ? grade.grade : (change?.saeGrade ?? null),
        oil_product: d.oilProduct || change?.oilProduct || '',
        draw_method: d.drawMethod,
        client_key: d.clientKey ?? null,
        created_by: actor.userId,
      });
      await recordSampleDrawn(trx, row.id, actor.userId);
      return succeed({ sample: toSample(row), repeated: false });
    });
  } catch (e) {
    // Two sends of one card racing, or two riders typing the same code at once: the unique indexes decide.
    // Whichever unique index fires first, a resend of the same card is recognised by its key.
    const constraint = (e as { constraint?: string }).constraint;
    if (constraint !== undefined && d.clientKey) {
      const again = await findSampleByClientKey(db, crewId, d.clientKey);
      if (again) return succeed({ sample: toSample(again), repeated: true });
    }
    if (constraint === 'samples_crew_id_bottle_code_norm_key') {
      return refuse(409, 'duplicate_bottle_code', 'That bottle code is already used.', {
        bottleCode: `Bottle code ${d.bottleCode} is already used in this crew.`,
      });
    }
    throw e;
  }
}

/** Marks a drawn sample shipped, with an optional tracking note. */
export async function markSampleShipped(
  db: Kysely<Database>,
  actor: Actor,
  sampleId: string,
  input: unknown,
): Promise<Result<Sample>> {
  const found = await getSampleDetail(db, actor, sampleId);
  if (!found.ok) return found;
  const m = await getMachine(db, actor, found.value.sample.machineId);
  if (!m.ok) return m;
  if (!canActorEdit(actor, m.value))
    return refuse(403, 'forbidden', 'Only the machine’s rider or a crew lead can mark its samples shipped.');
  const parsed = shipSchema.safeParse(input ?? {});
  if (!parsed.success) return refuseInvalid(parsed.error);
  if (found.value.sample.state !== 'drawn') {
    return refuse(409, 'wrong_state', `This sample is already ${found.value.sample.state.replace('_', ' ')}.`);
  }
  const moved = await db
    .transaction()
    .execute((trx) => recordSampleState(trx, sampleId, 'shipped', actor.userId, parsed.data.trackingNote));
  if (!moved) return refuse(409, 'wrong_state', 'This sample has moved on already.');
  const row = await findSampleOfCrew(db, actor.membership.crewId, sampleId);
  return row ? succeed(toSample(row)) : refuseNotFound('sample');
}

/** A sample of the actor's crew with its machine and state history. */
export async function getSampleDetail(db: Kysely<Database>, actor: Actor, sampleId: string) {
  if (!canReadCrew(actor.membership)) return refuseNotFound('sample');
  const row = await findSampleOfCrew(db, actor.membership.crewId, sampleId);
  if (!row) return refuseNotFound('sample');
  const [machine, events] = await Promise.all([getMachine(db, actor, row.machine_id), findSampleEvents(db, row.id)]);
  if (!machine.ok) return machine;
  const oilChange = row.oil_change_id ? await findOilChangeOfCrew(db, row.crew_id, row.oil_change_id) : undefined;
  return succeed({
    sample: toSample(row),
    machine: machine.value,
    events,
    oilChange: oilChange ? toOilChange(oilChange) : null,
  });
}

/** The crew's samples grouped by state, with counts. */
export async function listSamplesByState(db: Kysely<Database>, actor: Actor, state?: SampleState) {
  if (!canReadCrew(actor.membership))
    return { counts: { drawn: 0, shipped: 0, results_in: 0, reviewed: 0 }, samples: [] };
  const [counts, rows] = await Promise.all([
    countSamplesByState(db, actor.membership.crewId),
    findSamplesOfCrew(db, actor.membership.crewId, state),
  ]);
  return {
    counts,
    samples: rows.map((r) => ({ ...toSample(r), machineName: r.machine_name, machineMeter: r.machine_meter })),
  };
}

/** A machine's samples, newest first. */
export async function listSamplesOfMachine(db: Kysely<Database>, actor: Actor, machineId: string): Promise<Sample[]> {
  return (await findSamplesOfMachine(db, actor.membership.crewId, machineId)).map(toSample);
}

/** The id of the crew's sample holding a bottle code (any spelling of it), or null: what a tag issued offline opens. */
export async function findSampleIdByBottleCode(
  db: Kysely<Database>,
  actor: Actor,
  code: string,
): Promise<string | null> {
  if (!canReadCrew(actor.membership)) return null;
  const norm = normaliseBottleCode(code);
  if (!/^[A-Z0-9]{3,32}$/.test(norm)) return null;
  return (await findSampleByBottleCode(db, actor.membership.crewId, norm))?.id ?? null;
}
