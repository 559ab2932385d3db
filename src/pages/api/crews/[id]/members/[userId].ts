import type { APIRoute } from 'astro';
import { clientIp, getAuthDeps } from '~/lib/auth/deps';
import { requireApiUser } from '~/lib/auth/guards';
import { changeRoleSchema } from '~/lib/crews/crews';
import { changeMemberRole, findCrewForUser, removeMember } from '~/lib/crews/crews.service';
import { parseJsonBody } from '~/lib/http/json';
import { refusalJson } from '~/lib/http/responses';

async function actorFor(context: Parameters<APIRoute>[0]) {
  const user = requireApiUser(context.locals);
  if (user instanceof Response) return user;
  const crew = await findCrewForUser(getAuthDeps().db, context.params.id ?? '', user.id);
  if (!crew.ok) return refusalJson(crew);
  return { userId: user.id, displayName: user.displayName, membership: crew.value };
}

/** A lead sets a member's role with { role }; 204. */
export const PATCH: APIRoute = async (context) => {
  const actor = await actorFor(context);
  if (actor instanceof Response) return actor;
  const body = await parseJsonBody(context.request, changeRoleSchema);
  if (!body.ok) return body.response;
  const result = await changeMemberRole(getAuthDeps().db, actor, context.params.userId ?? '', body.data.role, {
    ip: clientIp(context),
  });
  return result.ok ? new Response(null, { status: 204 }) : refusalJson(result);
};

/** A lead removes a member, or a member leaves (their own id); 204. */
export const DELETE: APIRoute = async (context) => {
  const actor = await actorFor(context);
  if (actor instanceof Response) return actor;
  const result = await removeMember(getAuthDeps().db, actor, context.params.userId ?? '', { ip: clientIp(context) });
  return result.ok ? new Response(null, { status: 204 }) : refusalJson(result);
};
