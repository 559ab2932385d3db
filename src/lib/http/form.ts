import { readBodyBytes, readBodyText } from './json';

/** Cap on an HTML form post (sign-in, invitations, settings); uploads have their own limits elsewhere. */
export const DEFAULT_FORM_LIMIT_BYTES = 16 * 1024;

/**
 * True when the caller is a browser's form that wants a page back (a redirect, an inline error), false for a
 * script or an island that wants JSON. The Accept header decides when it names text/html or application/json
 * (a browser's navigation always sends text/html). When it names neither (a wildcard from curl or fetch),
 * `bareForm: 'page'` lets an endpoint whose plain HTML forms post urlencoded or multipart bodies treat such a
 * body as a form; by default the silent caller is a script and gets JSON.
 */
export function wantsPage(request: Request, options: { bareForm?: 'page' | 'json' } = {}): boolean {
  const accept = request.headers.get('accept') ?? '';
  if (/application\/json/i.test(accept)) return false;
  if (/text\/html/i.test(accept)) return true;
  return (
    options.bareForm === 'page' &&
    /^(application\/x-www-form-urlencoded|multipart\/form-data)\b/i.test(request.headers.get('content-type') ?? '')
  );
}

export type ParsedForm = { ok: true; form: URLSearchParams } | { ok: false; response: Response };

/** Reads an urlencoded form body with a size cap: 413 when it is larger, 415 when it is not a plain form. */
export async function readForm(request: Request, maxBytes = DEFAULT_FORM_LIMIT_BYTES): Promise<ParsedForm> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^application\/x-www-form-urlencoded\b/i.test(type)) {
    return {
      ok: false,
      response: new Response('Send this form as application/x-www-form-urlencoded.', { status: 415 }),
    };
  }
  const body = await readBodyText(request, maxBytes);
  if (!body.ok)
    return { ok: false, response: new Response('The form is larger than this page accepts.', { status: 413 }) };
  return { ok: true, form: new URLSearchParams(body.text) };
}

export type ParsedMultipart =
  { ok: true; form: FormData } | { ok: false; reason: 'too-large'; size: number } | { ok: false; reason: 'invalid' };

/**
 * Reads a multipart/form-data body through the bounded reader, so a body without a length header (chunked)
 * is cut off at `maxBytes` instead of buffered whole; then parses it.
 */
export async function readMultipartForm(request: Request, maxBytes: number): Promise<ParsedMultipart> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type)) return { ok: false, reason: 'invalid' };
  const body = await readBodyBytes(request, maxBytes);
  if (!body.ok) return { ok: false, reason: 'too-large', size: body.size };
  try {
    const bytes = Buffer.from(body.bytes.buffer, body.bytes.byteOffset, body.bytes.byteLength);
    return {
      ok: true,
      form: await new Request('http://local/', {
        method: 'POST',
        headers: { 'content-type': type },
        body: bytes as unknown as BodyInit,
      }).formData(),
    };
  } catch {
    return { ok: false, reason: 'invalid' };
  }
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
  // eslint-disable-next-line no-control-regex -- the control characters are what this pattern refuses
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
