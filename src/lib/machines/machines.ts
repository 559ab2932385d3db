import { z } from 'zod';
import type { MachineRow, RecommendedGrade } from '../db/database';
import { parseSaeGrade } from '../oil-changes/sae-grade';
import { fromCelsius, fromStoredMeter, toCelsius, type MeterUnit, type TemperatureUnit } from '../units/units';
import { checkbox, optionalNumber, text } from '~/lib/http/form-values';

export const ENGINE_LAYOUTS = ['single', 'twin', 'triple', 'four', 'other'] as const;
export const COOLINGS = ['air', 'oil', 'liquid'] as const;
export const METERS = ['mi', 'km', 'h'] as const;
export type Cooling = (typeof COOLINGS)[number];
/** What the machine counts distance in: miles, kilometres, or engine hours from an hour meter. */
export type Meter = (typeof METERS)[number];
/** How many grade rows the machine form offers (a manual rarely lists more). */
export const GRADE_ROWS = 4;

export const LAYOUT_LABELS: Record<(typeof ENGINE_LAYOUTS)[number], string> = {
  single: 'Single',
  twin: 'Twin',
  triple: 'Triple',
  four: 'Four',
  other: 'Other',
};
export const COOLING_LABELS: Record<(typeof COOLINGS)[number], string> = { air: 'Air', oil: 'Oil', liquid: 'Liquid' };
export const METER_LABELS: Record<MeterUnit, string> = { mi: 'Miles (mi)', km: 'Kilometres (km)', h: 'Hour meter (h)' };

/** A machine as screens use it: camelCase, canonical units (km or h, litres, °C). */
export interface Machine {
  id: string;
  crewId: string;
  ownerUserId: string;
  name: string;
  modelYear: number | null;
  engineLayout: MachineRow['engine_layout'];
  displacementCc: number | null;
  cooling: MachineRow['cooling'];
  sharedOil: boolean;
  oilCapacityL: number | null;
  meter: MeterUnit;
  recommendedGrades: RecommendedGrade[];
  /** Longest change interval the manufacturer allows, in the stored unit (km or h). */
  maxIntervalStored: number | null;
  maxIntervalDays: number | null;
  notes: string;
  archivedAt: Date | null;
}

/** Maps a machines row to the domain shape. */
export function toMachine(row: MachineRow): Machine {
  return {
    id: row.id,
    crewId: row.crew_id,
    ownerUserId: row.owner_user_id,
    name: row.name,
    modelYear: row.model_year,
    engineLayout: row.engine_layout,
    displacementCc: row.displacement_cc,
    cooling: row.cooling,
    sharedOil: row.shared_oil,
    oilCapacityL: row.oil_capacity_l,
    meter: row.meter,
    recommendedGrades: row.recommended_grades,
    maxIntervalStored: row.max_interval_distance,
    maxIntervalDays: row.max_interval_days,
    notes: row.notes,
    archivedAt: row.archived_at,
  };
}

const gradeRowSchema = z.object({
  grade: z.string(),
  min: optionalNumber('lowest temperature'),
  max: optionalNumber('highest temperature'),
});

/** The machine form and the JSON body: temperatures in the user's unit, the interval in the meter's unit. */
export const machineInputSchema = z.object({
  name: text(80, 'name').pipe(z.string().min(1, 'Give the machine a name, such as its nickname or model.')),
  modelYear: optionalNumber('year').pipe(
    z
      .number()
      .int('Enter a whole year.')
      .min(1900, 'Enter a year from 1900 on.')
      .max(new Date().getUTCFullYear() + 1, 'That year has not come yet.')
      .optional(),
  ),
  engineLayout: z.enum(ENGINE_LAYOUTS, { error: 'Choose the engine layout.' }),
  displacementCc: optionalNumber('displacement').pipe(
    z
      .number()
      .int('Enter whole cc.')
      .min(20, 'Enter the displacement in cc (20–3000).')
      .max(3000, 'Enter the displacement in cc (20–3000).')
      .optional(),
  ),
  cooling: z.enum(COOLINGS, { error: 'Choose how the engine is cooled.' }),
  sharedOil: checkbox,
  oilCapacityL: optionalNumber('oil capacity').pipe(
    z
      .number()
      .gt(0, 'The oil capacity must be more than 0 L.')
      .lt(40, 'The oil capacity must be under 40 L.')
      .optional(),
  ),
  meter: z.enum(METERS, { error: 'Choose miles, kilometres or an hour meter.' }),
  grades: z.array(gradeRowSchema).max(GRADE_ROWS).default([]),
  maxInterval: optionalNumber('longest interval').pipe(
    z
      .number()
      .gt(0, 'The longest interval must be more than 0.')
      .max(100_000, 'That interval is longer than any engine allows.')
      .optional(),
  ),
  maxIntervalDays: optionalNumber('longest interval in days').pipe(
    z
      .number()
      .int('Enter whole days.')
      .min(1, 'Enter at least 1 day.')
      .max(3650, 'Enter at most 3650 days.')
      .optional(),
  ),
  notes: text(2000, 'notes'),
});
export type MachineInput = z.infer<typeof machineInputSchema>;

/** Grade rows as a manual gives them: grade, optional temperature band in the user's unit → stored °C. */
export function parseGradeRows(
  rows: MachineInput['grades'],
  unit: TemperatureUnit,
): { ok: true; grades: RecommendedGrade[] } | { ok: false; fields: Record<string, string> } {
  const grades: RecommendedGrade[] = [];
  const fields: Record<string, string> = {};
  rows.forEach((r, i) => {
    const blank = r.grade.trim() === '' && r.min === undefined && r.max === undefined;
    if (blank) return;
    const g = parseSaeGrade(r.grade);
    if (!g.ok) {
      fields[`grades.${i}.grade`] = g.message;
      return;
    }
    // A band left open runs to the edge of the riding world (−40 °C … 55 °C).
    const minC = r.min === undefined ? -40 : toCelsius(r.min, unit);
    const maxC = r.max === undefined ? 55 : toCelsius(r.max, unit);
    if (minC >= maxC) {
      fields[`grades.${i}.max`] = 'The highest temperature must be above the lowest.';
      return;
    }
    if (minC < -60 || maxC > 70) {
      fields[`grades.${i}.min`] = 'Enter riding temperatures between −60 °C and 70 °C.';
      return;
    }
    grades.push({ grade: g.grade, minC: Math.round(minC * 10) / 10, maxC: Math.round(maxC * 10) / 10 });
  });
  return Object.keys(fields).length ? { ok: false, fields } : { ok: true, grades };
}

/** Reads the machine form's flat fields (grade_0, grade_min_0 …) into the schema's shape. */
export function collectMachineForm(form: Record<string, unknown>): Record<string, unknown> {
  const grades = [];
  for (let i = 0; i < GRADE_ROWS; i++) {
    grades.push({ grade: String(form[`grade_${i}`] ?? ''), min: form[`grade_min_${i}`], max: form[`grade_max_${i}`] });
  }
  return { ...form, grades };
}

/** The machine's values as the form shows them (for edit), in the user's temperature unit. */
export function machineFormValues(m: Machine, unit: TemperatureUnit): Record<string, string> {
  const v: Record<string, string> = {
    name: m.name,
    modelYear: m.modelYear?.toString() ?? '',
    engineLayout: m.engineLayout,
    displacementCc: m.displacementCc?.toString() ?? '',
    cooling: m.cooling,
    sharedOil: m.sharedOil ? 'on' : '',
    oilCapacityL: m.oilCapacityL?.toString() ?? '',
    meter: m.meter,
    maxInterval: m.maxIntervalStored === null ? '' : String(Math.round(fromStoredMeter(m.maxIntervalStored, m.meter))),
    maxIntervalDays: m.maxIntervalDays?.toString() ?? '',
    notes: m.notes,
  };
  m.recommendedGrades.forEach((g, i) => {
    v[`grade_${i}`] = g.grade;
    v[`grade_min_${i}`] = g.minC <= -40 ? '' : String(Math.round(fromCelsius(g.minC, unit)));
    v[`grade_max_${i}`] = g.maxC >= 55 ? '' : String(Math.round(fromCelsius(g.maxC, unit)));
  });
  return v;
}
