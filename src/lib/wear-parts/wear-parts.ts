import { z } from 'zod';
import type { WearMeasurementRow, WearPartRow } from '../db/database';
import { optionalNumber, pastDay, requiredNumber, text } from '~/lib/http/form-values';
import type { LengthUnit } from '../units/units';
import { clientKeySchema } from '../offline/client-key';

/**
 * The smallest step a workshop micrometer reads: 0.001 in or 0.01 mm (common practice, no published
 * source). The forecast uses it as the uncertainty of a single reading.
 */
export const MEASURING_RESOLUTION_MM: Record<LengthUnit, number> = { in: 0.0254, mm: 0.01 };

/** A wear part as screens use it: lengths in mm, fitted odometer in the stored unit. */
export interface WearPart {
  id: string;
  machineId: string;
  name: string;
  pieceCount: number;
  newMinMm: number;
  newMaxMm: number;
  serviceLimitMm: number;
  limitDirection: 'min' | 'max';
  fittedOdometer: number;
  manualUnit: LengthUnit;
  notes: string;
}

export interface WearMeasurement {
  id: string;
  measuredOn: string;
  odometer: number;
  piecesMm: number[];
  summaryMm: number;
  note: string;
}

/** Maps a wear_parts row. */
export function toWearPart(r: WearPartRow): WearPart {
  return {
    id: r.id,
    machineId: r.machine_id,
    name: r.name,
    pieceCount: r.piece_count,
    newMinMm: r.new_min_mm,
    newMaxMm: r.new_max_mm,
    serviceLimitMm: r.service_limit_mm,
    limitDirection: r.limit_direction,
    fittedOdometer: r.fitted_odometer,
    manualUnit: r.manual_unit,
    notes: r.notes,
  };
}

/** Maps a wear_measurements row. */
export function toWearMeasurement(r: WearMeasurementRow): WearMeasurement {
  return {
    id: r.id,
    measuredOn: r.measured_on,
    odometer: r.odometer,
    piecesMm: r.pieces_mm,
    summaryMm: r.summary_mm,
    note: r.note,
  };
}

const positive = (label: string) =>
  requiredNumber(label).pipe(
    z.number().gt(0, `The ${label} must be more than 0.`).lt(1000, `The ${label} must be under 1000.`),
  );

/** A wear part as the manual gives it, in the manual's unit; the fitted odometer in the machine's unit. */
export const wearPartInputSchema = z
  .object({
    name: text(80, 'name').pipe(z.string().min(1, 'Name the part, e.g. clutch friction plates.')),
    pieceCount: optionalNumber('number of pieces').pipe(
      z
        .number()
        .int('Enter a whole number of pieces.')
        .min(1, 'At least 1 piece.')
        .max(64, 'At most 64 pieces.')
        .optional(),
    ),
    unit: z.enum(['in', 'mm'], { error: 'Choose inches or millimetres.' }),
    newMin: positive('smallest new size'),
    newMax: positive('largest new size'),
    serviceLimit: positive('service limit'),
    limitDirection: z.enum(['min', 'max']).default('min'),
    fittedOdometer: optionalNumber('odometer when fitted').pipe(
      z.number().min(0, 'The odometer cannot be negative.').optional(),
    ),
    notes: text(1000, 'notes'),
  })
  .superRefine((v, ctx) => {
    if (v.newMax < v.newMin)
      ctx.addIssue({
        code: 'custom',
        path: ['newMax'],
        message: 'The largest new size must not be below the smallest.',
      });
    if (v.limitDirection === 'min' && v.serviceLimit >= v.newMin) {
      ctx.addIssue({
        code: 'custom',
        path: ['serviceLimit'],
        message: 'For a part that wears thinner, the service limit is below the new range.',
      });
    }
    if (v.limitDirection === 'max' && v.serviceLimit <= v.newMax) {
      ctx.addIssue({
        code: 'custom',
        path: ['serviceLimit'],
        message: 'For a part that grows, the service limit is above the new range.',
      });
    }
  });

/** A measurement: each piece (one per line or comma) or one summary value, in the given unit. */
export const measurementInputSchema = z.object({
  measuredOn: pastDay('date measured'),
  odometer: requiredNumber('odometer reading').pipe(z.number().min(0, 'The odometer cannot be negative.')),
  unit: z.enum(['in', 'mm'], { error: 'Choose inches or millimetres.' }),
  pieces: z.preprocess(
    (v) => (typeof v === 'string' ? v.split(/[\s,;]+/).filter((s) => s !== '') : (v ?? [])),
    z
      .array(
        z.preprocess(
          (s) => (typeof s === 'string' ? Number(s) : s),
          z.number({ error: 'Each piece must be a number.' }).refine(Number.isFinite, 'Each piece must be a number.'),
        ),
      )
      .max(64, 'At most 64 pieces.'),
  ),
  summary: optionalNumber('measurement'),
  note: text(500, 'note'),
  clientKey: clientKeySchema,
});
