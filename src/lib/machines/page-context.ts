import type { CrewMembership, SessionUser } from '../auth/types';
import { notFoundPage } from '../http/not-found';
import type { Actor, Refusal } from './service-result';

/** The services' actor for a signed-in user working in a crew. */
export function actorFrom(g: { user: SessionUser; crew: CrewMembership }): Actor {
  return { userId: g.user.id, membership: g.crew };
}

/** A page's answer to a refusal that has no field to show it beside: 404 renders src/pages/404.astro, 403 says why. */
export function refusalPage(r: Refusal): Response {
  // Astro renders the 404 page only for a body-less 404; another crew's record then looks like no record at all.
  if (r.status === 404) return notFoundPage();
  return new Response(r.message, { status: r.status, headers: { 'content-type': 'text/plain; charset=utf-8' } });
}

/** Form values as strings, for refilling a form after a refusal. */
export function echoValues(form: URLSearchParams | FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of form.entries()) if (typeof v === 'string') out[k] = out[k] === undefined ? v : `${out[k]}\n${v}`;
  return out;
}

/** An endpoint's answer to a refusal, in the shared { error: { code, message, fields } } shape. */
export function refusalJson(r: Refusal): Response {
  return new Response(JSON.stringify({ error: { code: r.code, message: r.message, fields: r.fields } }), {
    status: r.status, headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' },
  });
}
