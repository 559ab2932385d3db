import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { createMachine, listMachines } from '~/lib/machines/machines.service';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';

/** GET the crew's machines (?archived=1 to include archived ones). */
export const GET: APIRoute = async ({ locals, url }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  return jsonOk({
    machines: await listMachines(getDb(), actorFrom(g), { includeArchived: url.searchParams.get('archived') === '1' }),
  });
};

/** POST a machine (JSON; grade temperatures in the user's unit, the interval in the machine's meter unit). */
export const POST: APIRoute = async ({ request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const body = await parseJsonBody(request, z.looseObject({}));
  if (!body.ok) return body.response;
  const r = await createMachine(getDb(), actorFrom(g), body.data, g.user.temperatureUnit);
  return r.ok ? jsonOk({ machine: r.value }, 201) : refusalJson(r);
};
