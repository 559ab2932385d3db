import type { APIRoute } from 'astro';
import { requireApiCrew } from '~/lib/auth/guards';
import { canCreateMachine } from '~/lib/auth/permissions';
import { getDb } from '~/lib/db';
import { jsonError, jsonOk } from '~/lib/http/json';
import { formatIssuedCode } from '~/lib/samples/bottle-code';
import { issueBottleCode } from '~/lib/samples/samples.service';
import { actorFrom } from '~/lib/http/page-context';

/** POST: a fresh Sumpwise bottle code, unused in the crew (with its check character). */
export const POST: APIRoute = async ({ locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  if (!canCreateMachine(g.crew))
    return jsonError(403, 'forbidden', 'Your role in this crew does not register samples.');
  const code = await issueBottleCode(getDb(), actorFrom(g));
  return jsonOk({ code, display: formatIssuedCode(code) }, 201);
};
