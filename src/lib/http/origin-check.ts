// Cross-site request forgery guard for every state-changing request. Astro's built-in check is replaced
// by this one because it cannot exempt the RFC 8058 one-click unsubscribe address, which mail providers
// POST to from their own servers (no Origin, no cookies; the signed token in the address is the proof).

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);
/** Content types a cross-site HTML form can send without a CORS preflight. */
const FORM_TYPES = ['application/x-www-form-urlencoded', 'multipart/form-data', 'text/plain'];

export interface OriginPolicy {
  /** Origins that may write, e.g. the request's own and the configured public URL's. */
  allowedOrigins: readonly string[];
  /** Paths that accept a write from anywhere because they carry their own proof. */
  exemptPaths: readonly string[];
}

/**
 * True when the request must be refused: a write whose Origin is another site, or a form-type write with
 * no Origin at all (every current browser sends one on a form POST). Other writes without an Origin come
 * from non-browser clients: a browser always sends Origin on a cross-site POST, and cannot send JSON
 * cross-site without a preflight this app never grants.
 */
export function isForbiddenCrossSiteWrite(
  method: string,
  pathname: string,
  headers: Headers,
  policy: OriginPolicy,
): boolean {
  if (SAFE_METHODS.has(method.toUpperCase())) return false;
  if (policy.exemptPaths.includes(pathname)) return false;
  const origin = headers.get('origin');
  if (origin !== null) return !policy.allowedOrigins.includes(origin);
  const type = (headers.get('content-type') ?? '').split(';')[0]!.trim().toLowerCase();
  return FORM_TYPES.includes(type);
}
