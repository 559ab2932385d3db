import { jsonError } from '../http/json';
import type { CrewMembership, SessionUser } from './types';

// Page and endpoint gates. Pages: `const user = requireUser(Astro.locals, Astro.url); if (user instanceof
// Response) return user;`. Endpoints use the requireApi* forms, which answer JSON errors instead.

/** Where a signed-out visitor goes, with the page to come back to. */
export function signInRedirect(url: URL): Response {
  const next = `${url.pathname}${url.search}`;
  return new Response(null, { status: 303, headers: { location: `/sign-in?next=${encodeURIComponent(next)}` } });
}

/** The signed-in user, or a redirect to the sign-in page. */
export function requireUser(locals: App.Locals, url: URL): SessionUser | Response {
  return locals.user ?? signInRedirect(url);
}

/** The signed-in user and the crew they are working in, or a redirect to sign in. */
export function requireCrew(locals: App.Locals, url: URL): { user: SessionUser; crew: CrewMembership } | Response {
  if (!locals.user) return signInRedirect(url);
  // Every account has a crew from sign-up; a user who left them all is sent to make or join one.
  if (!locals.crew) return new Response(null, { status: 303, headers: { location: '/crews' } });
  return { user: locals.user, crew: locals.crew };
}

/** The signed-in user, or a 401 JSON error. */
export function requireApiUser(locals: App.Locals): SessionUser | Response {
  return locals.user ?? jsonError(401, 'unauthenticated', 'Sign in first.');
}

/** The signed-in user and their current crew, or a 401 JSON error. */
export function requireApiCrew(locals: App.Locals): { user: SessionUser; crew: CrewMembership } | Response {
  if (!locals.user) return jsonError(401, 'unauthenticated', 'Sign in first.');
  if (!locals.crew) return jsonError(404, 'not_found', 'You are not working in any crew.');
  return { user: locals.user, crew: locals.crew };
}
