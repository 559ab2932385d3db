import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { canReadCrew } from '~/lib/auth/permissions';
import { fieldErrorsFrom, jsonError, jsonOk } from '~/lib/http/json';
import { trendQuerySchema } from '~/lib/trends/trends';
import { loadMachineTrends } from '~/lib/trends/trends.service';

/** GET /api/trends/[machineId]?measurands=Fe,Al&basis=ppm|rate&x=odometer|date — the wear chart's data. */
export const GET: APIRoute = async ({ params, url, locals }) => {
  if (!locals.user) return jsonError(401, 'unauthenticated', 'Sign in to see this machine.');
  if (!canReadCrew(locals.crew)) return jsonError(404, 'not_found', 'No such machine in this crew.');
  const parsed = trendQuerySchema.safeParse(Object.fromEntries(url.searchParams));
  if (!parsed.success) return jsonError(400, 'invalid_input', 'The chart query needs attention.', fieldErrorsFrom(parsed.error));
  const data = await loadMachineTrends(getDb(), locals.crew.crewId, params.machineId ?? '', parsed.data);
  if (!data) return jsonError(404, 'not_found', 'No such machine in this crew.');
  return jsonOk(data);
};
