/** Review notes and interval-call decisions: input schemas and domain shapes. */
import { z } from 'zod';
import { CALL_KINDS, type IntervalCallKind } from '../levels';

export const NOTE_MAX = 4000;

const noteText = z.string().trim().max(NOTE_MAX, `Keep a note under ${NOTE_MAX} characters.`);

/** A review note on a sample. */
export const reviewNoteSchema = z.object({
  body: noteText.pipe(z.string().min(1, 'Write the note before saving it.')),
});

const optionalPositive = (what: string) =>
  z.preprocess(
    (v) => (v === '' || v === null || v === undefined ? undefined : typeof v === 'string' ? Number(v) : v),
    z
      .number({ error: `Enter the ${what} as a number.` })
      .positive(`The ${what} must be above zero.`)
      .max(10_000_000, `That ${what} is too large.`)
      .optional(),
  );

/** Confirm the current call, or override it with a note (required) and, optionally, new figures. */
export const callDecisionSchema = z.discriminatedUnion('action', [
  z.object({ action: z.literal('confirm'), note: noteText.optional().default('') }),
  z.object({
    action: z.literal('override'),
    call: z.enum(CALL_KINDS, { error: 'Pick shorten, hold, stretch or fix first.' }),
    note: noteText.pipe(z.string().min(1, 'An override needs a note saying why.')),
    /** In the machine's meter unit (mi, km or h). */
    nextInterval: optionalPositive('next interval'),
    nextSampleOdometer: optionalPositive('odometer for the next sample'),
    nextSampleOn: z.preprocess(
      (v) => (v === '' ? undefined : v),
      z
        .string()
        .regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter the date as YYYY-MM-DD.')
        .optional(),
    ),
  }),
]);

export type CallDecision = z.infer<typeof callDecisionSchema>;

export interface CallHistoryEntry {
  id: string;
  call: IntervalCallKind;
  source: 'engine' | 'confirmed' | 'override';
  /** Stored units (km or h). */
  nextInterval: number | null;
  nextSampleOdometer: number | null;
  nextSampleOn: string | null;
  reasons: string[];
  note: string;
  madeByName: string | null;
  createdAt: Date;
}

export interface ReviewNote {
  id: string;
  body: string;
  authorName: string;
  authorRole: string | null;
  createdAt: Date;
}

/** Take a sample out of the baseline, or put it back, with the reason (shown on the sample and the wear chart). */
export const baselineChoiceSchema = z.object({
  action: z.enum(['exclude', 'include'], { error: 'Choose whether the sample leaves the baseline or goes back in.' }),
  reason: z
    .string({ error: 'Say why, in a few words.' })
    .trim()
    .min(3, 'Say why, in a few words.')
    .max(500, 'Keep the reason under 500 characters.'),
  /** The first oil of a new or rebuilt engine (a checkbox: "on" when ticked). */
  breakIn: z
    .preprocess((v) => v === true || v === 'on' || v === 'true', z.boolean())
    .optional()
    .default(false),
});

export type BaselineChoice = z.infer<typeof baselineChoiceSchema>;

/** Whether a sample counts in its machine's baseline, and who said otherwise and why. */
export interface BaselineStatus {
  inBaseline: boolean;
  note: string;
  breakIn: boolean;
  changedByName: string | null;
  changedAt: Date | null;
}

/** At most this many steady calls are confirmed in one step, so one click stays one short transaction. */
export const STEADY_BATCH_MAX = 200;
/** How long the notice offers to undo a confirmation of steady calls (common practice, no published source). */
export const UNDO_SECONDS = 10;

/** Confirm every steady call waiting: nothing to fill in (a form's button sends no fields that matter). */
export const steadyConfirmSchema = z.object({});

/** Undo one step's confirmations: the ids of the calls it wrote (a form sends them comma-separated). */
export const steadyUndoSchema = z.object({
  callIds: z.preprocess(
    (v) => (typeof v === 'string' ? v.split(',').filter(Boolean) : v),
    z
      .array(z.uuid({ error: 'That undo link is not valid.' }), { error: 'That undo link is not valid.' })
      .min(1, 'That undo link is not valid.')
      .max(STEADY_BATCH_MAX, 'That undo link is not valid.'),
  ),
});
