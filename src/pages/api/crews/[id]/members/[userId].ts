import type { APIRoute } from 'astro';
import { clientIp, getAuthDeps } from '~/lib/auth/deps';
import { requireApiUser } from '~/lib/auth/guards';
import { changeRoleSchema } from '~/lib/crews/crews';
import { changeMemberRole, findCrewForUser, removeMember } from '~/lib/crews/crews.service';
import { jsonError, parseJsonBody } from '~/lib/http/json';
import { jsonFailure } from '~/lib/http/responses';

async function actorFor(context: Parameters<APIRoute>[0]) {
  const user = requireApiUser(context.locals);
  if (user instanceof Response) return user;
  const membership = await findCrewForUser(getAuthDeps().db, context.params.id ?? '', user.id);
  if (!membership) return jsonError(404, 'not_found', 'There is nothing here, or it belongs to a crew you are not in.');
  return { userId: user.id, displayName: user.displayName, membership };
}

/** A lead sets a member's role with { role }; 204. */
export const PATCH: APIRoute = async (context) => {
  const actor = await actorFor(context);
  if (actor instanceof Response) return actor;
  const body = await parseJsonBody(context.request, changeRoleSchema);
  if (!body.ok) return body.response;
  const result = await changeMemberRole(getAuthDeps().db, actor, context.params.userId ?? '', body.data.role, { ip: clientIp(context) });
  return result.ok ? new Response(null, { status: 204 }) : jsonFailure(result);
};

/** A lead removes a member, or a member leaves (their own id); 204. */
export const DELETE: APIRoute = async (context) => {
  const actor = await actorFor(context);
  if (actor instanceof Response) return actor;
  const result = await removeMember(getAuthDeps().db, actor, context.params.userId ?? '', { ip: clientIp(context) });
  return result.ok ? new Response(null, { status: 204 }) : jsonFailure(result);
};
