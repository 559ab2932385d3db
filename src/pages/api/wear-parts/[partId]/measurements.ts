import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { refuseQueuedWriteOfOtherCrew } from '~/lib/http/queued-write';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';
import { addWearMeasurement } from '~/lib/wear-parts/wear-parts.service';

/** POST a wear-part measurement (JSON, the fields of the measurement form). A resend with the same clientKey writes nothing new. */
export const POST: APIRoute = async ({ params, request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const otherCrew = refuseQueuedWriteOfOtherCrew(request, g.crew, locals.crews);
  if (otherCrew) return otherCrew;
  const body = await parseJsonBody(request, z.looseObject({}));
  if (!body.ok) return body.response;
  const r = await addWearMeasurement(getDb(), actorFrom(g), params.partId ?? '', body.data);
  return r.ok ? jsonOk({ measurement: r.value }, 201) : refusalJson(r);
};
