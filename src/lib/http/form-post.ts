import type { z } from 'zod';
import { readForm } from './form';
import { fieldErrorsFrom } from './json';
import type { FieldErrors, Result } from './result';

// The POST half of the account pages (sign in, sign up, reset, settings): read the form with the byte cap,
// check it against the schema, call one service, and on a refusal leave the page what to show beside its
// fields with the status (and Retry-After) already set. Astro's origin check has run before any of this, and
// rate limits are the services' own.

/** What a form page exposes of itself: its request and the response it is about to render. */
export interface FormPage {
  request: Request;
  response: { status?: number; headers: Headers };
}

export type FormPostOutcome<T, D = unknown> =
  /** The body was too large or not a form: answer with `response` as is. */
  | { status: 'unreadable'; response: Response }
  /** Invalid input or a service refusal: render the page again with these. */
  | { status: 'refused'; form: URLSearchParams; fields: FieldErrors; message: string }
  /** The service's value, with the parsed input it was called with. */
  | { status: 'done'; form: URLSearchParams; data: D; value: T };

export interface FormPostSteps<S extends z.ZodTypeAny, T> {
  schema: S;
  /** Builds the schema's input from the posted form. */
  input: (form: URLSearchParams) => unknown;
  /** The one service call, with the parsed input. */
  run: (data: z.infer<S>) => Promise<Result<T>>;
}

/** Reads the posted form (16 KiB cap) and settles it with {@link settleFormPost}. */
export async function handleFormPost<S extends z.ZodTypeAny, T>(
  page: FormPage,
  steps: FormPostSteps<S, T>,
): Promise<FormPostOutcome<T, z.infer<S>>> {
  const body = await readForm(page.request);
  if (!body.ok) return { status: 'unreadable', response: body.response };
  return settleFormPost(page, body.form, steps);
}

/**
 * Parses an already-read form and calls the service. Invalid input answers 400 with per-field messages; a
 * refusal sets its status (and Retry-After) on the page. A refusal about fields is shown beside them, any
 * other as one sentence (`message`, empty when fields carry it).
 */
export async function settleFormPost<S extends z.ZodTypeAny, T>(
  page: FormPage,
  form: URLSearchParams,
  steps: FormPostSteps<S, T>,
): Promise<Exclude<FormPostOutcome<T, z.infer<S>>, { status: 'unreadable' }>> {
  const parsed = steps.schema.safeParse(steps.input(form));
  if (!parsed.success) {
    page.response.status = 400;
    return { status: 'refused', form, fields: fieldErrorsFrom(parsed.error), message: '' };
  }
  const result = await steps.run(parsed.data);
  if (result.ok) return { status: 'done', form, data: parsed.data, value: result.value };
  page.response.status = result.status;
  if (result.retryAfterSeconds) page.response.headers.set('retry-after', String(result.retryAfterSeconds));
  const hasFields = Object.keys(result.fields).length > 0;
  return { status: 'refused', form, fields: result.fields, message: hasFields ? '' : result.message };
}
