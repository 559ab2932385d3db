import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';
import { createNewOilReference, listNewOilReferences } from '~/lib/new-oil/new-oil.service';

/** GET the crew's new-oil references. */
export const GET: APIRoute = async ({ locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  return jsonOk({ references: await listNewOilReferences(getDb(), actorFrom(g)) });
};

/** POST a new-oil reference: { source: 'data-sheet', productName, saeGrade?, KV100?, KV40?, TBN?, Zn?, … } or { source: 'lab', productName, bottleCode }. */
export const POST: APIRoute = async ({ request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const body = await parseJsonBody(request, z.looseObject({}));
  if (!body.ok) return body.response;
  const r = await createNewOilReference(getDb(), actorFrom(g), body.data);
  return r.ok ? jsonOk({ reference: r.value }, 201) : refusalJson(r);
};
