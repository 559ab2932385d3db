import { jsonError } from './json';

// While PostgreSQL cannot be reached every page would fail; visitors get one calm page that says so and
// asks them to try again, with 503 and Retry-After (RFC 9110 §15.6.4), and the log gets the real error.

/** PostgreSQL error classes and socket errors that mean "the database cannot be reached right now". */
const UNREACHABLE_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'ENOTFOUND',
  'EPIPE',
  // SQLSTATE class 08 (connection exception) and 57P0x (operator intervention: shutdown, cannot connect now).
  '08000',
  '08001',
  '08003',
  '08004',
  '08006',
  '57P01',
  '57P02',
  '57P03',
]);

/**
 * True when the error is the client going away while its request body was being read (Node's http server
 * fails the body with "aborted", code ECONNRESET): the client's doing, not the database's, though the code is
 * the same as a dropped database socket's.
 */
export function isClientAbort(error: unknown): boolean {
  return error instanceof Error && error.message === 'aborted' && (error as { code?: unknown }).code === 'ECONNRESET';
}

/** True when an error means the database is unreachable rather than a bug or a client that went away. */
export function isDatabaseUnavailable(error: unknown): boolean {
  if (isClientAbort(error)) return false;
  for (let e: unknown = error, depth = 0; e && depth < 4; e = (e as { cause?: unknown }).cause, depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && UNREACHABLE_CODES.has(code)) return true;
    const message = (e as { message?: unknown }).message;
    if (
      typeof message === 'string' &&
      /Connection terminated|connect ECONNREFUSED|timeout exceeded when trying to connect/i.test(message)
    )
      return true;
    if (e instanceof AggregateError && e.errors.some((inner) => isDatabaseUnavailable(inner))) return true;
  }
  return false;
}

let lastLogged = 0;
/** Logs why the database is unavailable, at most once every 10 s so an outage does not flood the log. */
export function logDatabaseUnavailable(where: string, reason: string): void {
  const now = Date.now();
  if (now - lastLogged < 10_000) return;
  lastLogged = now;
  console.error(`[${where}] database unavailable: ${reason}`);
}

const PAGE = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>Sumpwise is resting · try again shortly</title>
<style>body{font-family:system-ui,sans-serif;margin:0;background:#f6f4ef;color:#1f2420}main{max-width:34rem;margin:12vh auto;padding:1.5rem}
h1{font-size:1.6rem;margin:0 0 .75rem}p{line-height:1.5}a{display:inline-block;min-height:44px;line-height:44px;color:#1f4f3a;font-weight:600}</style></head>
<body><main><h1>Back in a moment</h1>
<p>Sumpwise cannot reach its database right now, so nothing can be shown or saved. Nothing you saved before is lost.</p>
<p>Please try again in a minute. If a form did not go through, send it again once this page loads normally.</p>
<p><a href="">Try again</a></p></main></body></html>`;

/** The answer while the database is unreachable: JSON for the API, a friendly page for everything else. */
export function databaseUnavailableResponse(pathname: string): Response {
  const headers = { 'retry-after': '30', 'cache-control': 'no-store' };
  if (pathname.startsWith('/api/')) {
    return jsonError(
      503,
      'database_unavailable',
      'Sumpwise cannot reach its database right now; nothing was saved. Try again in a minute.',
      {},
      headers,
    );
  }
  return new Response(PAGE, { status: 503, headers: { ...headers, 'content-type': 'text/html; charset=utf-8' } });
}
