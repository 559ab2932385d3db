/**
 * The crew's alert limits: which fixed limits a lead may change, each with its default and its source read from
 * the rule definitions (never copied), and the check of a submitted form. Pure.
 *
 * Only limits the engine still reads are offered: the fixed-limit elements, water, fuel and the KV100 change.
 * Boron stays in DEFAULT_FIXED_LIMITS for old data but no rule judges it against a fixed limit, so a field for it
 * would change nothing.
 */
import { z } from 'zod';
import { getMeasurand } from '../analysis/measurands';
import { DEFAULT_FIXED_LIMITS, FIXED_LIMIT, FUEL_DILUTION, VISCOSITY_CHANGE } from '../analysis/rule-definitions';
import type { FixedLimits } from '../analysis/types';

export interface LimitField {
  /** The key stored in crew_limits.measurand (the measurand code the import's recompute maps to FixedLimits). */
  measurand: string;
  key: keyof FixedLimits;
  label: string;
  unit: string;
  defaultValue: number;
  /** Where the default comes from: the rule definition's own source text. */
  source: string;
  /** What the limit does, in a sentence. */
  meaning: string;
  /** Accepted range (a Sumpwise sanity bound, no published source: it keeps typing slips out, nothing more). */
  min: number;
  max: number;
}

const WATCH_PERCENT = Math.round(FIXED_LIMIT.params.watchFraction * 100);

export const LIMIT_FIELDS: readonly LimitField[] = [
  ...FIXED_LIMIT.params.elements.map((code): LimitField => ({
    measurand: code,
    key: code,
    label: getMeasurand(code).name,
    unit: 'ppm',
    defaultValue: DEFAULT_FIXED_LIMITS[code],
    source: FIXED_LIMIT.source,
    meaning: `Act at or above this; watch from ${WATCH_PERCENT} % of it.`,
    min: 1,
    max: 2000,
  })),
  {
    measurand: 'WATER',
    key: 'waterPercent',
    label: 'Water',
    unit: '%',
    defaultValue: DEFAULT_FIXED_LIMITS.waterPercent,
    source: FIXED_LIMIT.source,
    meaning: `Act at or above this; watch from ${WATCH_PERCENT} % of it.`,
    min: 0.01,
    max: 5,
  },
  {
    measurand: 'FUEL',
    key: 'fuelPercent',
    label: 'Fuel dilution',
    unit: '%',
    defaultValue: DEFAULT_FIXED_LIMITS.fuelPercent,
    source: FUEL_DILUTION.source,
    meaning: `Act at or above this; watch above ${FUEL_DILUTION.params.watchPercent} %.`,
    min: 1,
    max: 20,
  },
  {
    measurand: 'KV100',
    key: 'kv100ChangePercent',
    label: 'Viscosity change at 100 °C from the oil as poured',
    unit: '%',
    defaultValue: DEFAULT_FIXED_LIMITS.kv100ChangePercent,
    source: VISCOSITY_CHANGE.source,
    meaning: `Watch when the oil is thicker or thinner than new by this much; act from ${VISCOSITY_CHANGE.params.actThinPercent} % thinner.`,
    min: 5,
    max: VISCOSITY_CHANGE.params.actThinPercent,
  },
];

/** A field's value as typed: at most this long (a figure needs far less; longer input is refused, not cut). */
export const MAX_INPUT_LENGTH = 20;

export type LimitValues = Record<string, number | null>;

/**
 * Checks a submitted form: for each field an empty box means "use the default" (null), anything else must be a
 * plain number within the field's range. Returns the values, or a message per field that failed.
 */
export function parseLimitsForm(
  form: URLSearchParams,
): { ok: true; values: LimitValues } | { ok: false; fields: Record<string, string>; raw: Record<string, string> } {
  const values: LimitValues = {};
  const fields: Record<string, string> = {};
  const raw: Record<string, string> = {};
  for (const f of LIMIT_FIELDS) {
    const text = form.get(f.measurand) ?? '';
    raw[f.measurand] = text.length > MAX_INPUT_LENGTH ? '' : text;
    if (text.length > MAX_INPUT_LENGTH) {
      fields[f.measurand] = `Too long: type a number of at most ${MAX_INPUT_LENGTH} characters.`;
      continue;
    }
    const trimmed = text.trim().replace(',', '.');
    if (trimmed === '') {
      values[f.measurand] = null;
      continue;
    }
    const parsed = z.coerce
      .number()
      .finite()
      .safeParse(/^[0-9]+(\.[0-9]+)?$/.test(trimmed) ? trimmed : 'x');
    if (!parsed.success) {
      fields[f.measurand] = 'Numbers only, like 20 or 0.1.';
      continue;
    }
    const v = parsed.data;
    if (v < f.min || v > f.max) {
      fields[f.measurand] = `Between ${f.min} and ${f.max} ${f.unit}.`;
      continue;
    }
    values[f.measurand] = v;
  }
  return Object.keys(fields).length ? { ok: false, fields, raw } : { ok: true, values };
}

/** The stored rows as the form shows them: the crew's own figure, or empty for the default. */
export function formValuesFrom(rows: readonly { measurand: string; act_at: number | null }[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (const f of LIMIT_FIELDS) {
    const row = rows.find((r) => r.measurand === f.measurand);
    out[f.measurand] = row && row.act_at !== null ? String(row.act_at) : '';
  }
  return out;
}
