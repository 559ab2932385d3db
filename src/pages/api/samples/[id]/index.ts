import type { APIRoute } from 'astro';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonOk } from '~/lib/http/json';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';
import { getSampleDetail } from '~/lib/samples/samples.service';

/** GET one sample of the crew with its state history. */
export const GET: APIRoute = async ({ params, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const r = await getSampleDetail(getDb(), actorFrom(g), params.id ?? '');
  if (!r.ok) return refusalJson(r);
  const { sample, machine, events } = r.value;
  return jsonOk({ sample, machine: { id: machine.id, name: machine.name, meter: machine.meter }, events });
};
