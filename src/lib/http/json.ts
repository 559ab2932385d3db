import type { z } from 'zod';

// One error shape for every JSON endpoint: { "error": { "code", "message", "fields" } }.

export type FieldErrors = Record<string, string>;

export interface ErrorBody {
  error: { code: string; message: string; fields: FieldErrors };
}

/** Default cap on a JSON request body; sign-in, invitations and settings are a few hundred bytes. */
export const DEFAULT_JSON_LIMIT_BYTES = 16 * 1024;

const JSON_HEADERS = { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' };

/** A JSON error response in the shared shape. */
export function jsonError(
  status: number,
  code: string,
  message: string,
  fields: FieldErrors = {},
  headers: Record<string, string> = {},
): Response {
  const body: ErrorBody = { error: { code, message, fields } };
  return new Response(JSON.stringify(body), { status, headers: { ...JSON_HEADERS, ...headers } });
}

/** A JSON success response. */
export function jsonOk(data: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(data), { status, headers: { ...JSON_HEADERS, ...headers } });
}

/** Flattens zod issues into { "field.path": "first message" } for inline display. */
export function fieldErrorsFrom(error: z.ZodError): FieldErrors {
  const fields: FieldErrors = {};
  for (const issue of error.issues) {
    // Unknown keys (a forged "role" or "crewId") are reported against each key, not the object.
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) fields[[...issue.path, key].join('.')] ??= 'is not accepted here';
      continue;
    }
    const key = issue.path.length ? issue.path.join('.') : '_';
    fields[key] ??= issue.message;
  }
  return fields;
}

/**
 * Reads a body up to `maxBytes`, whatever the transfer encoding (a chunked body has no length to trust). Past
 * it, the rest is read and dropped up to `drainLimit` (so the answer can name the real size and the client
 * sees the 413, not a reset), and never kept; past `drainLimit` the read stops at once and the connection ends.
 */
export async function readBodyBytes(
  request: Request,
  maxBytes: number,
  // Room to drain: three times the limit, at least 1 MiB and at most 16 MiB past it (common practice, no published source).
  drainLimit = maxBytes + Math.min(Math.max(3 * maxBytes, 1024 * 1024), 16 * 1024 * 1024),
): Promise<{ ok: true; bytes: Uint8Array } | { ok: false; size: number }> {
  const declared = Number(request.headers.get('content-length') ?? 'NaN');
  if (Number.isFinite(declared) && declared > drainLimit) return { ok: false, size: declared };
  if (!request.body) return { ok: true, bytes: new Uint8Array(0) };
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > drainLimit) {
      await reader.cancel().catch(() => {});
      return { ok: false, size };
    }
    if (size <= maxBytes) chunks.push(value);
  }
  if (size > maxBytes) return { ok: false, size };
  return { ok: true, bytes: Buffer.concat(chunks) };
}

/** Reads a body as text but stops as soon as it passes maxBytes, so a huge upload is never buffered. */
export async function readBodyText(
  request: Request,
  maxBytes: number,
): Promise<{ ok: true; text: string } | { ok: false }> {
  const body = await readBodyBytes(request, maxBytes);
  return body.ok ? { ok: true, text: Buffer.from(body.bytes).toString('utf8') } : { ok: false };
}

export type ParsedBody<T> = { ok: true; data: T } | { ok: false; response: Response };

/** Parses a JSON body against a zod schema: 413 when oversized, 415 when not JSON, 400 (with fields) when invalid. */
export async function parseJsonBody<S extends z.ZodType>(
  request: Request,
  schema: S,
  maxBytes = DEFAULT_JSON_LIMIT_BYTES,
): Promise<ParsedBody<z.infer<S>>> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^application\/json\b/i.test(type)) {
    return {
      ok: false,
      response: jsonError(415, 'unsupported_media_type', 'Send the request body as application/json.'),
    };
  }
  const body = await readBodyText(request, maxBytes);
  if (!body.ok)
    return {
      ok: false,
      response: jsonError(413, 'payload_too_large', `The request body is larger than ${maxBytes} bytes.`),
    };
  let raw: unknown;
  try {
    raw = body.text === '' ? {} : JSON.parse(body.text);
  } catch {
    return { ok: false, response: jsonError(400, 'invalid_json', 'The request body is not valid JSON.') };
  }
  const parsed = schema.safeParse(raw);
  if (!parsed.success) {
    return {
      ok: false,
      response: jsonError(400, 'invalid_input', 'Some fields need attention.', fieldErrorsFrom(parsed.error)),
    };
  }
  return { ok: true, data: parsed.data };
}
