import type { APIRoute } from 'astro';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonOk } from '~/lib/http/json';
import { actorFrom } from '~/lib/http/page-context';
import { listPagesToKeep } from '~/lib/offline/offline.service';

/** GET the pages this device should keep for use without a network (the signed-in crew's garage side). */
export const GET: APIRoute = async ({ locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  return jsonOk({ crewId: g.crew.crewId, pages: await listPagesToKeep(getDb(), actorFrom(g)) });
};
