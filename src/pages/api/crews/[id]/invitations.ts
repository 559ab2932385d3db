import type { APIRoute } from 'astro';
import { clientIp, getAuthDeps } from '~/lib/auth/deps';
import { requireApiUser } from '~/lib/auth/guards';
import { inviteSchema } from '~/lib/crews/crews';
import { findCrewForUser, inviteMember } from '~/lib/crews/crews.service';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { refusalJson } from '~/lib/http/responses';

/** A lead invites { email, role } to the crew; 201 with the invitation id (the link goes only by e-mail). */
export const POST: APIRoute = async (context) => {
  const user = requireApiUser(context.locals);
  if (user instanceof Response) return user;
  const deps = getAuthDeps();
  const crew = await findCrewForUser(deps.db, context.params.id ?? '', user.id);
  if (!crew.ok) return refusalJson(crew);
  const body = await parseJsonBody(context.request, inviteSchema);
  if (!body.ok) return body.response;
  const result = await inviteMember(
    deps,
    { userId: user.id, displayName: user.displayName, membership: crew.value },
    body.data,
    { ip: clientIp(context) },
  );
  if (!result.ok) return refusalJson(result);
  return jsonOk({ invitationId: result.value.invitationId }, 201);
};
