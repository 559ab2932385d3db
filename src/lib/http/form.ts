import { readBodyText } from './json';

/** Cap on an HTML form post (sign-in, invitations, settings); uploads have their own limits elsewhere. */
export const DEFAULT_FORM_LIMIT_BYTES = 16 * 1024;

export type ParsedForm = { ok: true; form: URLSearchParams } | { ok: false; response: Response };

/** Reads an urlencoded form body with a size cap: 413 when it is larger, 415 when it is not a plain form. */
export async function readForm(request: Request, maxBytes = DEFAULT_FORM_LIMIT_BYTES): Promise<ParsedForm> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^application\/x-www-form-urlencoded\b/i.test(type)) {
    return { ok: false, response: new Response('Send this form as application/x-www-form-urlencoded.', { status: 415 }) };
  }
  const body = await readBodyText(request, maxBytes);
  if (!body.ok) return { ok: false, response: new Response('The form is larger than this page accepts.', { status: 413 }) };
  return { ok: true, form: new URLSearchParams(body.text) };
}

/** A form value as trimmed text ('' when absent). */
export function formText(form: URLSearchParams, name: string): string {
  return (form.get(name) ?? '').trim();
}

/** Only same-site paths are followed after sign-in, so ?next= cannot send a user elsewhere. */
export function safeNextPath(next: string | null | undefined, fallback = '/'): string {
  if (!next || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return fallback;
  return next;
}
