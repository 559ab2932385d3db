import type { z } from 'zod';

// One outcome shape for the rider-side services: a value, or a refusal that a page shows beside its fields
// and an endpoint sends as { error: { code, message, fields } }. Nothing is written when a refusal comes back.

export type FieldErrors = Record<string, string>;

export type Refusal = {
  ok: false;
  status: 400 | 403 | 404 | 409 | 413 | 415;
  code: string;
  message: string;
  fields: FieldErrors;
};

export type ServiceResult<T> = { ok: true; value: T } | Refusal;

/** A successful outcome. */
export function succeed<T>(value: T): { ok: true; value: T } {
  return { ok: true, value };
}

/** A refusal with a status, a machine-readable code, a sentence and per-field messages. */
export function refuse(status: Refusal['status'], code: string, message: string, fields: FieldErrors = {}): Refusal {
  return { ok: false, status, code, message, fields };
}

/** The usual "no such record in your crew" answer: another crew's id looks exactly like a missing one. */
export function refuseNotFound(what: string): Refusal {
  return refuse(404, 'not_found', `No such ${what} in your crew.`);
}

/** A 400 refusal naming the first problem of each field from a zod error. */
export function refuseInvalid(error: z.ZodError, message = 'Some fields need attention.'): Refusal {
  const fields: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.map(String).join('.') : '_';
    fields[key] ??= issue.message;
  }
  return refuse(400, 'invalid_input', message, fields);
}

/** Who is acting, and in which crew with which role. */
export interface Actor {
  userId: string;
  membership: import('../auth/types').CrewMembership;
}

/** Turns a posted form into a plain object: repeated names become arrays, everything else a string. */
export function readFormObject(form: URLSearchParams | FormData, repeated: readonly string[] = []): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [key, value] of form.entries()) {
    if (typeof value !== 'string') continue;
    if (repeated.includes(key)) ((out[key] ??= []) as string[]).push(value);
    else out[key] = value;
  }
  return out;
}
