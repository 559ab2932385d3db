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

/** Longest next path kept; a real in-app path is far shorter (common practice, no published source). */
const MAX_NEXT_PATH = 2048;
// A base that can never be the app's own address, to see where a browser would take a relative path.
const PROBE_ORIGIN = 'http://next-path.invalid';

/**
 * Only paths that resolve to this app's own origin are followed after sign-in, so ?next= cannot send a user
 * elsewhere. The text is resolved with the WHATWG URL rules browsers use (which drop tabs and newlines and
 * read a backslash as a slash), and any control character or backslash refuses it outright. The answer is
 * the resolved path itself, so what the browser follows is exactly what was checked.
 */
export function safeNextPath(next: string | null | undefined, fallback = '/'): string {
  if (!next || next.length > MAX_NEXT_PATH || !next.startsWith('/')) return fallback;
  // C0 controls, DEL and backslashes have no place in a path this app links to.
  if (/[\u0000-\u001f\u007f\\]/.test(next)) return fallback;
  let resolved: URL;
  try {
    resolved = new URL(next, PROBE_ORIGIN);
  } catch {
    return fallback;
  }
  if (resolved.origin !== PROBE_ORIGIN) return fallback;
  const path = `${resolved.pathname}${resolved.search}${resolved.hash}`;
  // "/.//evil.example" resolves to the path "//evil.example", which a Location header reads as another host.
  if (!path.startsWith('/') || path.startsWith('//')) return fallback;
  return path;
}
