import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import type { SampleState } from '~/lib/db/database';
import { jsonError, jsonOk, parseJsonBody } from '~/lib/http/json';
import { refuseQueuedWriteOfOtherCrew } from '~/lib/http/queued-write';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';
import { SAMPLE_STATES } from '~/lib/samples/samples';
import { listSamplesByState, registerDrainCard } from '~/lib/samples/samples.service';

/** GET ?state=drawn|shipped|results_in|reviewed: the crew's samples and the count in each state. */
export const GET: APIRoute = async ({ locals, url }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const state = url.searchParams.get('state');
  if (state && !SAMPLE_STATES.includes(state as SampleState))
    return jsonError(400, 'invalid_input', 'Unknown state.', { state: `Use one of ${SAMPLE_STATES.join(', ')}.` });
  return jsonOk(await listSamplesByState(getDb(), actorFrom(g), (state ?? undefined) as SampleState | undefined));
};

const bodySchema = z.looseObject({ machineId: z.string().min(1, 'Say which machine the sample is from.') });

/** POST a drain card (JSON). A resend with the same clientKey answers the first sample with 200. */
export const POST: APIRoute = async ({ request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const otherCrew = refuseQueuedWriteOfOtherCrew(request, g.crew, locals.crews);
  if (otherCrew) return otherCrew;
  const body = await parseJsonBody(request, bodySchema);
  if (!body.ok) return body.response;
  const { machineId, ...card } = body.data;
  const r = await registerDrainCard(getDb(), actorFrom(g), machineId, card);
  if (!r.ok) return refusalJson(r);
  return jsonOk({ sample: r.value.sample, repeated: r.value.repeated }, r.value.repeated ? 200 : 201);
};
