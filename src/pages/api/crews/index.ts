import type { APIRoute } from 'astro';
import { clientIp, getAuthDeps } from '~/lib/auth/deps';
import { requireApiUser } from '~/lib/auth/guards';
import { createCrewSchema } from '~/lib/crews/crews';
import { createCrew } from '~/lib/crews/crews.service';
import { jsonOk, parseJsonBody } from '~/lib/http/json';

/** The crews the user belongs to. */
export const GET: APIRoute = ({ locals }) => {
  const user = requireApiUser(locals);
  if (user instanceof Response) return user;
  return jsonOk({ crews: locals.crews, currentCrewId: locals.crew?.crewId ?? null });
};

/** Creates a crew from { name }; the creator leads it. */
export const POST: APIRoute = async (context) => {
  const user = requireApiUser(context.locals);
  if (user instanceof Response) return user;
  const body = await parseJsonBody(context.request, createCrewSchema);
  if (!body.ok) return body.response;
  const { crewId } = await createCrew(getAuthDeps().db, user.id, body.data.name, { ip: clientIp(context) });
  return jsonOk({ crewId }, 201);
};
