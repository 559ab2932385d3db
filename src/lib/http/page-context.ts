import type { Kysely } from 'kysely';
import type { CrewMembership, SessionUser } from '../auth/types';
import { requireCrew } from '../auth/guards';
import { getDb } from '../db';
import type { Database } from '../db/database';
import { forbiddenPage } from './forbidden';
import { canActorEdit, getMachine } from '~/lib/machines/machines.service';
import { notFoundPage } from './not-found';
import type { Actor } from '../auth/types';
import type { Refusal } from './result';

/** The services' actor for a signed-in user working in a crew. */
export function actorFrom(g: { user: SessionUser; crew: CrewMembership }): Actor {
  return { userId: g.user.id, displayName: g.user.displayName, membership: g.crew };
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

/** What a machine page needs once the visitor may see it. */
export interface MachinePageContext {
  g: { user: SessionUser; crew: CrewMembership };
  actor: Actor;
  db: Kysely<Database>;
  machine: Awaited<ReturnType<typeof getMachine>> extends infer R
    ? R extends { ok: true; value: infer M }
      ? M
      : never
    : never;
}

/**
 * Loads the machine of a page's [id] for the signed-in member, or returns the page's answer instead: the
 * sign-in redirect, the 404 page (no such machine in this crew), or with `edit` the 403 page for a member
 * who may not change it.
 */
export async function loadMachinePage(
  astro: {
    locals: App.Locals;
    url: URL;
    params: Record<string, string | undefined>;
    rewrite: (to: string) => Promise<Response>;
  },
  options: { edit: boolean },
): Promise<Response | MachinePageContext> {
  const g = requireCrew(astro.locals, astro.url);
  if (g instanceof Response) return g;
  const actor = actorFrom(g);
  const db = getDb();
  const found = await getMachine(db, actor, astro.params.id ?? '');
  if (!found.ok) return refusalPage(found);
  if (options.edit && !canActorEdit(actor, found.value)) return forbiddenPage(astro, 'edit-machine');
  return { g, actor, db, machine: found.value };
}
