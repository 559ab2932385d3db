import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';
import { deleteNewOilReference, getNewOilReference, updateNewOilReference } from '~/lib/new-oil/new-oil.service';

/** GET one new-oil reference of the crew. */
export const GET: APIRoute = async ({ params, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const r = await getNewOilReference(getDb(), actorFrom(g), params.id ?? '');
  return r.ok ? jsonOk({ reference: r.value }) : refusalJson(r);
};

/** PUT the whole reference again (its source stays). */
export const PUT: APIRoute = async ({ params, request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const body = await parseJsonBody(request, z.looseObject({}));
  if (!body.ok) return body.response;
  const r = await updateNewOilReference(getDb(), actorFrom(g), params.id ?? '', body.data);
  return r.ok ? jsonOk({ reference: r.value }) : refusalJson(r);
};

/** DELETE a reference. */
export const DELETE: APIRoute = async ({ params, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const r = await deleteNewOilReference(getDb(), actorFrom(g), params.id ?? '');
  return r.ok ? jsonOk(r.value) : refusalJson(r);
};
