import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { deleteMachine, getMachine, setMachineArchived, updateMachine } from '~/lib/machines/machines.service';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';

/** GET one machine of the crew (another crew's id answers 404). */
export const GET: APIRoute = async ({ params, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const r = await getMachine(getDb(), actorFrom(g), params.id ?? '');
  return r.ok ? jsonOk({ machine: r.value }) : refusalJson(r);
};

/** PUT the machine's details (the same body as POST /api/machines). */
export const PUT: APIRoute = async ({ params, request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const body = await parseJsonBody(request, z.looseObject({}));
  if (!body.ok) return body.response;
  const r = await updateMachine(getDb(), actorFrom(g), params.id ?? '', body.data, g.user.temperatureUnit);
  return r.ok ? jsonOk({ machine: r.value }) : refusalJson(r);
};

/** PATCH { archived: boolean }: archives or restores. */
export const PATCH: APIRoute = async ({ params, request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const body = await parseJsonBody(request, z.strictObject({ archived: z.boolean() }));
  if (!body.ok) return body.response;
  const r = await setMachineArchived(getDb(), actorFrom(g), params.id ?? '', body.data.archived);
  return r.ok ? jsonOk({ machine: r.value }) : refusalJson(r);
};

/** DELETE a machine with no records (otherwise 409: archive it instead). */
export const DELETE: APIRoute = async ({ params, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const r = await deleteMachine(getDb(), actorFrom(g), params.id ?? '');
  return r.ok ? jsonOk(r.value) : refusalJson(r);
};
