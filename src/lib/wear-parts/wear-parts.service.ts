import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { forecastWearLimit, type WearForecast } from '../analysis/wear-forecast';
import { canActorEdit, getMachine } from '../machines/machines.service';
import type { Machine } from '../machines/machines';
import { refuse, refuseInvalid, refuseNotFound, succeed, type Result } from '~/lib/http/result';
import type { Actor } from '~/lib/auth/types';
import { explainAbsurdOdometer } from '../oil-changes/oil-changes';
import { fromMillimetres, fromStoredMeter, toMillimetres, toStoredMeter, type MeterUnit } from '../units/units';
import { formatCount } from '../words/words';
import {
  MEASURING_RESOLUTION_MM,
  measurementInputSchema,
  toWearMeasurement,
  toWearPart,
  wearPartInputSchema,
  type WearMeasurement,
  type WearPart,
} from './wear-parts';
import {
  findMeasurementByClientKey,
  findMeasurementsOfParts,
  findWearPartOfCrew,
  findWearPartsOfMachine,
  insertMeasurement,
  insertWearPart,
} from './wear-parts.repository';

/**
 * A machine's wear parts with their measurements and forecasts, for the machine page: two queries whatever the
 * number of parts. The machine is one the caller already loaded for this actor's crew.
 */
export async function listWearPartDetails(
  db: Kysely<Database>,
  actor: Actor,
  machine: Machine,
): Promise<WearPartDetail[]> {
  const parts = (await findWearPartsOfMachine(db, actor.membership.crewId, machine.id)).map(toWearPart);
  const rows = await findMeasurementsOfParts(
    db,
    parts.map((p) => p.id),
  );
  const byPart = new Map<string, WearMeasurement[]>();
  for (const r of rows) {
    const list = byPart.get(r.wear_part_id) ?? [];
    list.push(toWearMeasurement(r));
    byPart.set(r.wear_part_id, list);
  }
  return parts.map((part) => {
    const measurements = byPart.get(part.id) ?? [];
    return {
      part,
      meter: machine.meter,
      machineName: machine.name,
      measurements,
      forecast: forecastPart(part, measurements, machine.meter),
    };
  });
}

/** Adds a wear part to a machine, from figures in the manual's unit. */
export async function createWearPart(
  db: Kysely<Database>,
  actor: Actor,
  machineId: string,
  input: unknown,
): Promise<Result<WearPart>> {
  const m = await getMachine(db, actor, machineId);
  if (!m.ok) return m;
  if (!canActorEdit(actor, m.value))
    return refuse(403, 'forbidden', 'Only the machine’s rider or a crew lead can add wear parts.');
  const parsed = wearPartInputSchema.safeParse(input);
  if (!parsed.success) return refuseInvalid(parsed.error);
  const d = parsed.data;
  const fitted = toStoredMeter(d.fittedOdometer ?? 0, m.value.meter);
  const absurd = explainAbsurdOdometer(fitted, m.value.meter);
  if (absurd) return refuse(400, 'invalid_input', 'Some fields need attention.', { fittedOdometer: absurd });
  const row = await insertWearPart(db, {
    crew_id: actor.membership.crewId,
    machine_id: machineId,
    name: d.name,
    piece_count: d.pieceCount ?? 1,
    new_min_mm: toMillimetres(d.newMin, d.unit),
    new_max_mm: toMillimetres(d.newMax, d.unit),
    service_limit_mm: toMillimetres(d.serviceLimit, d.unit),
    limit_direction: d.limitDirection,
    fitted_odometer: fitted,
    manual_unit: d.unit,
    notes: d.notes,
  });
  return succeed(toWearPart(row));
}

export interface WearPartDetail {
  part: WearPart;
  meter: MeterUnit;
  machineName: string;
  measurements: WearMeasurement[];
  /** In the manual's unit and the machine's meter unit. */
  forecast: WearForecast;
}

/** A wear part of the crew with its measurements and forecast. */
export async function getWearPartDetail(
  db: Kysely<Database>,
  actor: Actor,
  partId: string,
): Promise<Result<WearPartDetail>> {
  const row = await findWearPartOfCrew(db, actor.membership.crewId, partId);
  if (!row) return refuseNotFound('wear part');
  const m = await getMachine(db, actor, row.machine_id);
  if (!m.ok) return m;
  const measurements = (await findMeasurementsOfParts(db, [partId])).map(toWearMeasurement);
  const part = toWearPart(row);
  return succeed({
    part,
    meter: m.value.meter,
    machineName: m.value.name,
    measurements,
    forecast: forecastPart(part, measurements, m.value.meter),
  });
}

/** The forecast of a part in the manual's unit, with odometers in the machine's unit. */
export function forecastPart(part: WearPart, measurements: readonly WearMeasurement[], meter: MeterUnit): WearForecast {
  const u = part.manualUnit;
  const f = forecastWearLimit({
    newMin: fromMillimetres(part.newMinMm, u),
    newMax: fromMillimetres(part.newMaxMm, u),
    serviceLimit: fromMillimetres(part.serviceLimitMm, u),
    limitDirection: part.limitDirection,
    fittedAt: fromStoredMeter(part.fittedOdometer, meter),
    readings: measurements.map((x) => ({
      odometer: fromStoredMeter(x.odometer, meter),
      value: fromMillimetres(x.summaryMm, u),
    })),
    resolution: fromMillimetres(MEASURING_RESOLUTION_MM[u], u),
    pieceCount: part.pieceCount,
  });
  return f;
}

/**
 * Records a measurement. Each piece (or a single summary) must lie between zero and the top of the new
 * range (plus the tool's resolution); the summary of several pieces is the worst one, since the service
 * limit applies to every piece.
 */
export async function addWearMeasurement(
  db: Kysely<Database>,
  actor: Actor,
  partId: string,
  input: unknown,
): Promise<Result<WearMeasurement>> {
  const detail = await getWearPartDetail(db, actor, partId);
  if (!detail.ok) return detail;
  const { part, meter } = detail.value;
  const machine = await getMachine(db, actor, part.machineId);
  if (!machine.ok) return machine;
  if (!canActorEdit(actor, machine.value))
    return refuse(403, 'forbidden', 'Only the machine’s rider or a crew lead can record measurements.');
  const parsed = measurementInputSchema.safeParse(input);
  if (!parsed.success) return refuseInvalid(parsed.error);
  const d = parsed.data;
  // A resend of a queued measurement (same device key) answers the first one and writes nothing.
  const again = d.clientKey ? await findMeasurementByClientKey(db, partId, d.clientKey) : undefined;
  if (again) return succeed(toWearMeasurement(again));
  const invalid = (field: string, message: string) =>
    refuse(400, 'invalid_input', 'Some fields need attention.', { [field]: message });
  const valuesMm = (d.pieces.length ? d.pieces : d.summary !== undefined ? [d.summary] : []).map((v) =>
    toMillimetres(v, d.unit),
  );
  const field = d.pieces.length ? 'pieces' : 'summary';
  if (valuesMm.length === 0) return invalid('summary', 'Enter the measurement of each piece, or one value.');
  if (d.pieces.length > part.pieceCount)
    return invalid(
      'pieces',
      `This part has ${formatCount(part.pieceCount, 'piece')}; ${formatCount(d.pieces.length, 'value')} ${d.pieces.length === 1 ? 'was' : 'were'} given.`,
    );
  const slack = MEASURING_RESOLUTION_MM[d.unit];
  const top = part.limitDirection === 'min' ? part.newMaxMm + slack : Infinity;
  for (const v of valuesMm) {
    if (v <= 0) return invalid(field, 'A measurement must be more than zero.');
    if (v > top) {
      return invalid(
        field,
        `${fromMillimetres(v, d.unit).toFixed(d.unit === 'in' ? 4 : 3)} ${d.unit} is above the new range (up to ${fromMillimetres(part.newMaxMm, d.unit).toFixed(d.unit === 'in' ? 3 : 2)} ${d.unit}); check the reading and the unit.`,
      );
    }
  }
  const odometer = toStoredMeter(d.odometer, meter);
  const absurd = explainAbsurdOdometer(odometer, meter);
  if (absurd) return invalid('odometer', absurd);
  if (odometer < part.fittedOdometer) return invalid('odometer', 'This reading is from before the part was fitted.');
  const summary = part.limitDirection === 'min' ? Math.min(...valuesMm) : Math.max(...valuesMm);
  const row = await insertMeasurement(db, {
    wear_part_id: partId,
    measured_on: d.measuredOn,
    odometer,
    pieces_mm: JSON.stringify(d.pieces.length ? valuesMm : []),
    summary_mm: summary,
    note: d.note,
    created_by: actor.userId,
    client_key: d.clientKey ?? null,
  });
  // No row: a racing send of the same measurement won; answer that one.
  const written = row ?? (d.clientKey ? await findMeasurementByClientKey(db, partId, d.clientKey) : undefined);
  if (!written) throw new Error('A measurement was neither written nor found by its key.');
  return succeed(toWearMeasurement(written));
}
