import type { z } from 'zod';
import { fieldErrorsFrom, type FieldErrors } from './json';

// One outcome shape for every service: a value, or a refusal that a page shows beside its fields and an
// endpoint sends as { error: { code, message, fields } } (with Retry-After when rate limited). Nothing is
// written when a refusal comes back.

export type { FieldErrors } from './json';

/** Every status a service refuses with; a route answers it as is. */
export type RefusalStatus = 400 | 401 | 403 | 404 | 409 | 410 | 413 | 415 | 422 | 429 | 503;

export interface Refusal {
  ok: false;
  status: RefusalStatus;
  /** Machine-readable, stable: scripts and tests match on it. */
  code: string;
  /** One sentence for a person. */
  message: string;
  /** Per-field messages (empty when the problem is not one field's). */
  fields: FieldErrors;
  /** Set on 429 (and 503 when known): seconds until trying again makes sense. */
  retryAfterSeconds?: number;
}

export type Result<T> = { ok: true; value: T } | Refusal;

/** A successful outcome. */
export function succeed<T>(value: T): { ok: true; value: T } {
  return { ok: true, value };
}

/** A refusal with a status, a machine-readable code, a sentence and per-field messages. */
export function refuse(
  status: RefusalStatus,
  code: string,
  message: string,
  fields: FieldErrors = {},
  options: { retryAfterSeconds?: number } = {},
): Refusal {
  return options.retryAfterSeconds === undefined
    ? { ok: false, status, code, message, fields }
    : { ok: false, status, code, message, fields, retryAfterSeconds: options.retryAfterSeconds };
}

/**
 * The usual "no such record in your crew" answer: another crew's id looks exactly like a missing one. With
 * no `what`, the crew-wide sentence used where naming the kind of record would already say too much.
 */
export function refuseNotFound(what?: string): Refusal {
  return refuse(
    404,
    'not_found',
    what ? `No such ${what} in your crew.` : 'There is nothing here, or it belongs to a crew you are not in.',
  );
}

/** The usual 403: a member whose role may not do this. */
export function refuseForbidden(message = 'Your role in this crew does not allow that.'): Refusal {
  return refuse(403, 'forbidden', message);
}

/** A 400 refusal naming the first problem of each field from a zod error. */
export function refuseInvalid(error: z.ZodError, message = 'Some fields need attention.'): Refusal {
  return refuse(400, 'invalid_input', message, fieldErrorsFrom(error));
}

/** Turns a posted form into a plain object: repeated names become arrays, everything else a string. */
export function readFormObject(
  form: URLSearchParams | FormData,
  repeated: readonly string[] = [],
): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [key, value] of form.entries()) {
    if (typeof value !== 'string') continue;
    if (repeated.includes(key)) ((out[key] ??= []) as string[]).push(value);
    else out[key] = value;
  }
  return out;
}
