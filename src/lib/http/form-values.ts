import { z } from 'zod';

// zod pieces that accept both a JSON value and the text of an HTML form field, so one schema serves the
// endpoint and the progressive-enhancement form.

const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);
const toNumber = (v: unknown) => {
  const b = blankToUndefined(v);
  if (typeof b === 'string') {
    // Thousands separators are common when typing odometers ("17,000"); a comma is never a decimal here.
    const n = Number(b.replace(/[,\s_]/g, ''));
    return Number.isNaN(n) ? b : n;
  }
  return b;
};

/** A required number from a form or JSON, with a message for "missing" and "not a number". */
export function requiredNumber(label: string) {
  return z.preprocess(
    toNumber,
    z
      .number({ error: (i) => (i.input === undefined ? `Enter the ${label}.` : `The ${label} must be a number.`) })
      .refine(Number.isFinite, `The ${label} must be a number.`),
  );
}

/** An optional number ('' → undefined). */
export function optionalNumber(label: string) {
  return z.preprocess(
    toNumber,
    z
      .number({ error: `The ${label} must be a number.` })
      .refine(Number.isFinite, `The ${label} must be a number.`)
      .optional(),
  );
}

/** A checkbox: 'on'/'true'/'1'/true → true; absent → false. */
export const checkbox = z.preprocess((v) => v === true || v === 'on' || v === 'true' || v === '1', z.boolean());

/** Trimmed text with a length cap; absent → ''. */
export function text(max: number, label = 'text') {
  return z.preprocess(
    (v) => (v === undefined || v === null ? '' : v),
    z.string().trim().max(max, `Keep the ${label} under ${max} characters.`),
  );
}

/** A calendar day 'YYYY-MM-DD', not in the future (one day of slack for time zones). */
export function pastDay(label: string, today: () => Date = () => new Date()) {
  return z.preprocess(
    blankToUndefined,
    z
      .string({ error: `Enter the ${label}.` })
      .regex(/^\d{4}-\d{2}-\d{2}$/, `Enter the ${label} as a date.`)
      .refine((d) => !Number.isNaN(Date.parse(`${d}T00:00:00Z`)), `Enter the ${label} as a date.`)
      .refine(
        (d) => Date.parse(`${d}T00:00:00Z`) <= today().getTime() + 86_400_000,
        `The ${label} cannot be in the future.`,
      )
      .refine((d) => d >= '1950-01-01', `The ${label} is too far in the past.`),
  );
}

/** Today's date as 'YYYY-MM-DD' (UTC). */
export function todayIso(now: Date = new Date()): string {
  return now.toISOString().slice(0, 10);
}
