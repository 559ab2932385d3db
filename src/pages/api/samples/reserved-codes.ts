import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';
import { formatIssuedCode } from '~/lib/samples/bottle-code';
import { reserveBottleCodes } from '~/lib/samples/samples.service';

const bodySchema = z.object({ deviceKey: z.string().regex(/^[A-Za-z0-9_-]{8,64}$/, 'Not a valid device key.') });

/** POST { deviceKey }: this device's block of reserved Sumpwise bottle codes, topped up, for use without a network. */
export const POST: APIRoute = async ({ request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const body = await parseJsonBody(request, bodySchema);
  if (!body.ok) return body.response;
  const r = await reserveBottleCodes(getDb(), actorFrom(g), body.data.deviceKey);
  if (!r.ok) return refusalJson(r);
  return jsonOk({
    crewId: g.crew.crewId,
    codes: r.value.codes.map((code) => ({ code, display: formatIssuedCode(code) })),
  });
};
