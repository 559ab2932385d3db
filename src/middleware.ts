import { defineMiddleware } from 'astro:middleware';
import { randomUUID } from 'node:crypto';
import { securityHeaders } from './lib/http/security-headers';
import { getLucia, loadSession, mayClearStaleSessionCookie } from './lib/auth/session';
import { isForbiddenCrossSiteWrite } from './lib/http/origin-check';
import { getConfig } from './lib/config';
import {
  databaseUnavailableResponse,
  isClientAbort,
  isDatabaseUnavailable,
  logDatabaseUnavailable,
} from './lib/http/unavailable';

/** Writes that carry their own proof (a signed token) and are POSTed by mail providers' servers. */
const ORIGIN_EXEMPT_PATHS = ['/api/unsubscribe'];

function withSecurityHeaders(response: Response): Response {
  for (const [name, value] of Object.entries(securityHeaders())) {
    if (!response.headers.has(name)) response.headers.set(name, value);
  }
  return response;
}

// Every request: the cross-site write guard, defaults for the locals pages read, the session and crew behind the cookie, then the
// security headers on the response.
export const onRequest = defineMiddleware(async (context, next) => {
  context.locals.requestId = randomUUID();
  context.locals.user = null;
  context.locals.session = null;
  context.locals.crew = null;
  context.locals.crews = [];
  const allowedOrigins = [context.url.origin, new URL(getConfig().PUBLIC_URL).origin];
  if (
    isForbiddenCrossSiteWrite(context.request.method, context.url.pathname, context.request.headers, {
      allowedOrigins,
      exemptPaths: ORIGIN_EXEMPT_PATHS,
    })
  ) {
    return withSecurityHeaders(
      new Response('Cross-site POST form submissions are forbidden', {
        status: 403,
        headers: { 'content-type': 'text/plain' },
      }),
    );
  }
  let loaded: Awaited<ReturnType<typeof loadSession>>;
  try {
    loaded = await loadSession(getLucia(), context.cookies, {
      clearStale: mayClearStaleSessionCookie(context.request.headers),
    });
  } catch (error) {
    // The health check must still answer while the database is down; other routes get the friendly 503.
    if (context.url.pathname === '/api/health') loaded = null;
    else if (isDatabaseUnavailable(error)) {
      logDatabaseUnavailable('request', error instanceof Error ? error.message : String(error));
      return withSecurityHeaders(databaseUnavailableResponse(context.url.pathname));
    } else throw error;
  }
  if (loaded) {
    context.locals.user = loaded.user;
    context.locals.session = loaded.session;
    context.locals.crews = loaded.crews;
    context.locals.crew = loaded.crew;
  }
  let response: Response;
  try {
    response = withSecurityHeaders(await next());
  } catch (error) {
    // The client left while its body was on the way (a phone that navigated away mid-upload): nobody reads
    // this answer, and it is not an outage to log.
    if (isClientAbort(error))
      return withSecurityHeaders(new Response('The request was cut off before it arrived whole.', { status: 400 }));
    // The database went away between the session and the page's own queries.
    if (!isDatabaseUnavailable(error)) throw error;
    logDatabaseUnavailable('request', error instanceof Error ? error.message : String(error));
    return withSecurityHeaders(databaseUnavailableResponse(context.url.pathname));
  }
  // Pages behind a session must not be kept by shared caches or the back button after sign-out.
  if (loaded && !response.headers.has('cache-control')) response.headers.set('cache-control', 'private, no-store');
  return response;
});
