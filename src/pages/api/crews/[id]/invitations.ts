import type { APIRoute } from 'astro';
import { clientIp, getAuthDeps } from '~/lib/auth/deps';
import { requireApiUser } from '~/lib/auth/guards';
import { inviteSchema } from '~/lib/crews/crews';
import { findCrewForUser, inviteMember } from '~/lib/crews/crews.service';
import { jsonError, jsonOk, parseJsonBody } from '~/lib/http/json';
import { jsonFailure } from '~/lib/http/responses';

/** A lead invites { email, role } to the crew; 201 with the invitation id (the link goes only by e-mail). */
export const POST: APIRoute = async (context) => {
  const user = requireApiUser(context.locals);
  if (user instanceof Response) return user;
  const deps = getAuthDeps();
  const membership = await findCrewForUser(deps.db, context.params.id ?? '', user.id);
  if (!membership) return jsonError(404, 'not_found', 'There is nothing here, or it belongs to a crew you are not in.');
  const body = await parseJsonBody(context.request, inviteSchema);
  if (!body.ok) return body.response;
  const result = await inviteMember(deps, { userId: user.id, displayName: user.displayName, membership }, body.data, { ip: clientIp(context) });
  if (!result.ok) return jsonFailure(result);
  return jsonOk({ invitationId: result.invitationId }, 201);
};
