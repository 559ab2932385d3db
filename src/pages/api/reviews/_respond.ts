/** Shared answers of the review endpoints: JSON for scripts and the island, 303 redirects for plain HTML forms. */
import { signInRedirect } from '~/lib/auth/guards';
import { readForm, wantsPage } from '~/lib/http/form';
import { rewriteToNotFoundPage } from '~/lib/http/not-found';
import { fieldErrorsFrom, jsonError, jsonOk, parseJsonBody } from '~/lib/http/json';
import type { APIContext } from 'astro';
import type { z } from 'zod';

/**
 * The answer to a signed-out visitor: a browser's form post goes to sign in and comes back to the sample
 * page (the endpoint itself has no page to return to); a JSON call gets 401 JSON.
 */
export function refuseSignedOut(request: Request, back: string, message: string): Response {
  if (wantsPage(request, { bareForm: 'page' })) return signInRedirect(new URL(back, 'http://local'));
  return jsonError(401, 'unauthenticated', message);
}

export type Body<T> = { ok: true; data: T; form: boolean } | { ok: false; response: Response };

/** Reads a JSON or urlencoded body against a schema; a form's invalid input goes back to the page with its message. */
export async function readReviewBody<S extends z.ZodType>(
  request: Request,
  schema: S,
  back: string,
): Promise<Body<z.infer<S>>> {
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
    return {
      ok: false,
      response: redirectBack(back, {
        review_error: Object.values(fields)[0] ?? 'Some fields need attention.',
        draft: String(raw['note'] ?? raw['body'] ?? '').slice(0, 1000),
      }),
    };
  }
  return { ok: true, data: parsed.data, form: true };
}

/** A 303 back to the sample page's review section with a message in the query. */
export function redirectBack(back: string, params: Record<string, string>): Response {
  const q = new URLSearchParams(params).toString();
  return new Response(null, { status: 303, headers: { location: `${back}${q ? `?${q}` : ''}#review` } });
}

/**
 * The answer for a failed service call in either mode. A form for a sample the crew does not hold gets the
 * 404 page (never a trip back to that sample), and a role that may not review gets a plain refusal; what a
 * reviewer can fix (no results yet, no call) goes back to the panel with the message.
 */
export async function failure(
  context: APIContext,
  form: boolean,
  back: string,
  status: number,
  code: string,
  message: string,
): Promise<Response> {
  if (!form) return jsonError(status, code, message);
  if (status === 404) return rewriteToNotFoundPage(context);
  if (status === 403)
    return new Response(message, { status, headers: { 'content-type': 'text/plain; charset=utf-8' } });
  return redirectBack(back, { review_error: message });
}

/** The answer for a success in either mode. */
export function success(form: boolean, back: string, saved: string, data: unknown): Response {
  return form ? redirectBack(back, { review_saved: saved }) : jsonOk(data, 201);
}

/** Where the home page's review queue answers a plain form: back to the queue with what happened in the query. */
export function backToQueue(params: Record<string, string>): Response {
  const q = new URLSearchParams(params).toString();
  return new Response(null, { status: 303, headers: { location: `/?${q}#review-queue` } });
}

/** A refusal of the review queue's endpoints: JSON as usual; a form gets the 404 page, a plain 403, or the queue. */
export async function queueFailure(
  context: APIContext,
  form: boolean,
  r: { status: number; code: string; message: string },
): Promise<Response> {
  if (!form || r.status === 403 || r.status === 404) return failure(context, form, '/', r.status, r.code, r.message);
  return backToQueue({ steady_error: r.code });
}
