/** Shared answers of the review endpoints: JSON for scripts and the island, 303 redirects for plain HTML forms. */
import { readForm } from '../../../lib/http/form';
import { fieldErrorsFrom, jsonError, jsonOk, parseJsonBody } from '../../../lib/http/json';
import type { z } from 'zod';

export type Body<T> = { ok: true; data: T; form: boolean } | { ok: false; response: Response };

/** Reads a JSON or urlencoded body against a schema; a form's invalid input goes back to the page with its message. */
export async function readReviewBody<S extends z.ZodType>(request: Request, schema: S, back: string): Promise<Body<z.infer<S>>> {
  const type = request.headers.get('content-type') ?? '';
  if (/^application\/json\b/i.test(type)) {
    const parsed = await parseJsonBody(request, schema);
    return parsed.ok ? { ok: true, data: parsed.data, form: false } : parsed;
  }
  const read = await readForm(request);
  if (!read.ok) return read;
  const raw = Object.fromEntries(read.form);
  const parsed = schema.safeParse(raw);
  if (!parsed.success) {
    const fields = fieldErrorsFrom(parsed.error);
    return { ok: false, response: redirectBack(back, { review_error: Object.values(fields)[0] ?? 'Some fields need attention.', draft: String(raw['note'] ?? raw['body'] ?? '').slice(0, 1000) }) };
  }
  return { ok: true, data: parsed.data, form: true };
}

/** A 303 back to the sample page's review section with a message in the query. */
export function redirectBack(back: string, params: Record<string, string>): Response {
  const q = new URLSearchParams(params).toString();
  return new Response(null, { status: 303, headers: { location: `${back}${q ? `?${q}` : ''}#review` } });
}

/** The answer for a failed service call in either mode. */
export function failure(form: boolean, back: string, status: number, code: string, message: string): Response {
  return form ? redirectBack(back, { review_error: message }) : jsonError(status, code, message);
}

/** The answer for a success in either mode. */
export function success(form: boolean, back: string, saved: string, data: unknown): Response {
  return form ? redirectBack(back, { review_saved: saved }) : jsonOk(data, 201);
}

export const STATUS: Record<string, number> = { not_found: 404, forbidden: 403, no_call: 409, no_results: 409 };
