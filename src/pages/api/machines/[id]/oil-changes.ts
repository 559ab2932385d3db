import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '../../../../lib/auth/guards';
import { getDb } from '../../../../lib/db';
import { jsonOk, parseJsonBody } from '../../../../lib/http/json';
import { actorFrom, refusalJson } from '../../../../lib/machines/page-context';
import { createOilChange, listOilChanges } from '../../../../lib/oil-changes/oil-changes.service';

/** GET the machine's oil changes, newest first, with the distance since the previous one. */
export const GET: APIRoute = async ({ params, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const r = await listOilChanges(getDb(), actorFrom(g), params.id ?? '');
  return r.ok ? jsonOk({ oilChanges: r.value.map((c) => ({ ...c, photos: c.photos.map((p) => ({ id: p.id, url: `/api/photos/${p.id}` })) })) }) : refusalJson(r);
};

/** POST an oil change (JSON; photoIds from POST /api/photos). */
export const POST: APIRoute = async ({ params, request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const body = await parseJsonBody(request, z.looseObject({}));
  if (!body.ok) return body.response;
  const r = await createOilChange(getDb(), actorFrom(g), params.id ?? '', body.data);
  return r.ok ? jsonOk({ oilChange: r.value }, 201) : refusalJson(r);
};
