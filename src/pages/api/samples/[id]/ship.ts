import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';
import { markSampleShipped } from '~/lib/samples/samples.service';

/** POST { trackingNote? }: marks a drawn sample shipped. */
export const POST: APIRoute = async ({ params, request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const body = await parseJsonBody(request, z.strictObject({ trackingNote: z.string().max(200).optional() }));
  if (!body.ok) return body.response;
  const r = await markSampleShipped(getDb(), actorFrom(g), params.id ?? '', body.data);
  return r.ok ? jsonOk({ sample: r.value }) : refusalJson(r);
};
