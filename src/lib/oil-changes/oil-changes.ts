import { z } from 'zod';
import type { OilChangeRow } from '../db/database';
import { checkbox, optionalNumber, pastDay, requiredNumber, text } from '~/lib/http/form-values';
import type { MeterUnit } from '../units/units';
import { clientKeySchema } from '../offline/client-key';

/** Highest believable meter readings in the stored unit: 2,000,000 km, 100,000 engine hours. */
export const ODOMETER_CEILING: Record<'distance' | 'h', number> = { distance: 2_000_000, h: 100_000 };

/** An oil change as screens use it; odometer in the stored unit (km or h). */
export interface OilChange {
  id: string;
  machineId: string;
  changedOn: string;
  odometer: number;
  meterReplaced: boolean;
  oilProduct: string;
  saeGrade: string;
  volumeL: number | null;
  filterChanged: boolean;
  topUpL: number;
  otherWork: string[];
  notes: string;
  /** Stored-unit distance (or hours) since the previous oil change; null for the first or after a meter swap. */
  distanceSincePrevious: number | null;
}

/** Maps a row to the domain shape (the distance is filled in by the list). */
export function toOilChange(row: OilChangeRow, distanceSincePrevious: number | null = null): OilChange {
  return {
    id: row.id,
    machineId: row.machine_id,
    changedOn: row.changed_on,
    odometer: row.odometer,
    meterReplaced: row.meter_replaced,
    oilProduct: row.oil_product,
    saeGrade: row.sae_grade,
    volumeL: row.volume_l,
    filterChanged: row.filter_changed,
    topUpL: row.top_up_l,
    otherWork: row.other_work,
    notes: row.notes,
    distanceSincePrevious,
  };
}

/** Oil changes in date order with the distance since the previous one computed. */
export function computeDistances(rowsOldestFirst: readonly OilChangeRow[]): OilChange[] {
  return rowsOldestFirst.map((row, i) => {
    const prev = rowsOldestFirst[i - 1];
    const d = prev && !row.meter_replaced ? row.odometer - prev.odometer : null;
    return toOilChange(row, d !== null && d >= 0 ? d : null);
  });
}

/** Other work done: one item per line in the form, or an array in JSON. */
const otherWorkSchema = z.preprocess(
  (v) => (typeof v === 'string' ? v.split(/\r?\n/) : (v ?? [])),
  z
    .array(z.string().trim().max(200, 'Keep each item of other work under 200 characters.'))
    .transform((a) => a.filter((s) => s !== ''))
    .pipe(z.array(z.string()).max(20, 'List at most 20 items of other work.')),
);

const uuid = z.string().regex(/^[0-9a-f-]{36}$/i, 'Not a photo id.');

/** The oil-change form and JSON body; the odometer is in the machine's own meter unit. */
export const oilChangeInputSchema = z.object({
  changedOn: pastDay('date of the oil change'),
  odometer: requiredNumber('odometer reading').pipe(z.number().min(0, 'The odometer cannot be negative.')),
  meterReplaced: checkbox,
  oilProduct: text(120, 'oil product'),
  saeGrade: z.preprocess((v) => v ?? '', z.string()),
  volumeL: optionalNumber('volume').pipe(
    z.number().gt(0, 'The volume must be more than 0 L.').lt(40, 'The volume must be under 40 L.').optional(),
  ),
  filterChanged: checkbox,
  topUpL: optionalNumber('top-up').pipe(
    z.number().min(0, 'The top-up cannot be negative.').lt(40, 'The top-up must be under 40 L.').optional(),
  ),
  otherWork: otherWorkSchema,
  notes: text(2000, 'notes'),
  photoIds: z.preprocess(
    (v) => (typeof v === 'string' ? [v] : (v ?? [])),
    z.array(uuid).max(20, 'Attach at most 20 photos.'),
  ),
  clientKey: clientKeySchema,
});
export type OilChangeInput = z.infer<typeof oilChangeInputSchema>;

/** Why a meter reading in the stored unit is not believable, or null. */
export function explainAbsurdOdometer(stored: number, meter: MeterUnit): string | null {
  const ceiling = meter === 'h' ? ODOMETER_CEILING.h : ODOMETER_CEILING.distance;
  if (stored > ceiling) {
    return meter === 'h'
      ? 'That is more engine hours than any machine runs; check the reading.'
      : 'That is further than any engine runs; check the reading.';
  }
  return null;
}
