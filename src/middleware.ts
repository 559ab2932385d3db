import { defineMiddleware } from 'astro:middleware';
import { randomUUID } from 'node:crypto';
import { securityHeaders } from './lib/http/security-headers';

// Every request: defaults for the locals pages read, then the security headers on the response.
// The accounts module adds session loading here.
export const onRequest = defineMiddleware(async (context, next) => {
  context.locals.requestId = randomUUID();
  context.locals.user = null;
  context.locals.session = null;
  context.locals.crew = null;
  context.locals.crews = [];
  const response = await next();
  for (const [name, value] of Object.entries(securityHeaders())) {
    if (!response.headers.has(name)) response.headers.set(name, value);
  }
  return response;
});
