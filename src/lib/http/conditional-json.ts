/**
 * JSON that a browser may keep and revalidate: an entity tag of the body, 304 Not Modified when the client
 * already holds it (RFC 9110 §13.1.2, If-None-Match), and gzip when the client accepts it (RFC 9110 §12.5.3,
 * Accept-Encoding). For read endpoints whose answers are large and change rarely, such as the wear chart's.
 */
import { createHash } from 'node:crypto';
import { promisify } from 'node:util';
import { gzip } from 'node:zlib';

const gzipAsync = promisify(gzip);

/** Below this a gzip header and trailer cost more than they save (common practice, no published source). */
const MIN_GZIP_BYTES = 1024;

/** Longest If-None-Match or Accept-Encoding read; a real one is a few entity tags or codings long. */
const MAX_HEADER_CHARS = 4096;

/**
 * A weak entity tag of the body: the same body gives the same tag whatever its encoding (gzip or not), which
 * is what weak comparison, the one If-None-Match uses, allows (RFC 9110 §8.8.3).
 */
export function entityTagOf(body: string): string {
  return `W/"${createHash('sha256').update(body).digest('base64url').slice(0, 32)}"`;
}

/** True when If-None-Match names `etag` (weak comparison) or is "*" (RFC 9110 §13.1.2). Anything malformed is no match. */
export function ifNoneMatchMatches(header: string | null, etag: string): boolean {
  if (header === null || header.length === 0 || header.length > MAX_HEADER_CHARS) return false;
  const opaque = (tag: string) => (tag.startsWith('W/') ? tag.slice(2) : tag);
  const wanted = opaque(etag);
  for (const raw of header.split(',')) {
    const tag = raw.trim();
    if (tag === '*') return true;
    if (/^(?:W\/)?"[^"]*"$/.test(tag) && opaque(tag) === wanted) return true;
  }
  return false;
}

/** True when Accept-Encoding allows gzip: named (or "*") with a q-value above zero, and not refused by name (RFC 9110 §12.5.3). */
export function acceptsGzip(header: string | null): boolean {
  if (header === null || header.length === 0 || header.length > MAX_HEADER_CHARS) return false;
  let named: number | null = null;
  let star: number | null = null;
  for (const part of header.split(',')) {
    const [coding = '', ...params] = part.split(';').map((s) => s.trim().toLowerCase());
    let q = 1;
    for (const p of params) {
      const m = /^q=([01](?:\.\d{0,3})?)$/.exec(p);
      if (m) q = Number(m[1]);
    }
    if (coding === 'gzip' || coding === 'x-gzip') named = Math.max(named ?? 0, q);
    else if (coding === '*') star = q;
  }
  return named !== null ? named > 0 : star !== null && star > 0;
}

const CACHE_CONTROL = 'private, no-cache';
const VARY = 'Accept-Encoding, Cookie';

/**
 * 304 Not Modified with no body when the request's If-None-Match names `etag`, else null. For an endpoint that can
 * tell its answer's tag before building the answer (see `conditionalJson`'s `etag`).
 */
export function notModified(request: Request, etag: string): Response | null {
  if (!ifNoneMatchMatches(request.headers.get('if-none-match'), etag)) return null;
  return new Response(null, { status: 304, headers: { 'cache-control': CACHE_CONTROL, vary: VARY, etag } });
}

/**
 * A weak entity tag from the parts an answer is made of (a data fingerprint, the query, the answer's format),
 * rather than from the answer itself, so that it can be checked before the answer is built.
 */
export function entityTagFromParts(parts: readonly string[]): string {
  return `W/"${createHash('sha256').update(parts.join('\u0000')).digest('base64url').slice(0, 32)}"`;
}

/**
 * A JSON answer made once and sent as often as asked: its text, its tag, and its gzip once a client has accepted
 * one (kept on the object, so an answer that is kept, as the wear chart's are, is compressed only once).
 */
export interface PreparedJson {
  readonly body: string;
  readonly etag: string;
  gzipped?: Uint8Array<ArrayBuffer>;
}

/** The answer's text and tag: of the body, unless `etag` gives one made from what the body was built from. */
export function prepareJson(data: unknown, etag?: string): PreparedJson {
  const body = JSON.stringify(data);
  return { body, etag: etag ?? entityTagOf(body) };
}

/** Bytes a prepared answer holds: its text (UTF-16 in memory) and its gzip once made. */
export function preparedJsonBytes(prepared: PreparedJson): number {
  return prepared.body.length * 2 + (prepared.gzipped?.byteLength ?? 0);
}

/**
 * A JSON answer with an entity tag: 304 with no body when the request's If-None-Match already names it, else
 * 200 with the body, gzipped when accepted. Private and revalidated on every use: the answer depends on the
 * signed-in crew, so no shared cache may keep it, and the browser asks each time (cheaply, when unchanged).
 */
export async function answerPreparedJson(request: Request, prepared: PreparedJson): Promise<Response> {
  const { body, etag } = prepared;
  const unchanged = notModified(request, etag);
  if (unchanged) return unchanged;
  const headers: Record<string, string> = {
    'content-type': 'application/json; charset=utf-8',
    'cache-control': CACHE_CONTROL,
    vary: VARY,
    etag,
  };
  if (body.length >= MIN_GZIP_BYTES && acceptsGzip(request.headers.get('accept-encoding'))) {
    prepared.gzipped ??= new Uint8Array(await gzipAsync(Buffer.from(body, 'utf8')));
    return new Response(prepared.gzipped, {
      status: 200,
      headers: { ...headers, 'content-encoding': 'gzip', 'content-length': String(prepared.gzipped.byteLength) },
    });
  }
  return new Response(body, { status: 200, headers });
}

/**
 * `answerPreparedJson` for an answer made for this request only. The tag is of the body unless `etag` gives one
 * made from what the body was built from (entityTagFromParts).
 */
export function conditionalJson(request: Request, data: unknown, etag?: string): Promise<Response> {
  return answerPreparedJson(request, prepareJson(data, etag));
}
