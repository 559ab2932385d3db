import type { APIRoute } from 'astro';
import { requireApiUser } from '~/lib/auth/guards';
import { jsonOk } from '~/lib/http/json';

/** The signed-in user, their current crew and all their crews. */
export const GET: APIRoute = ({ locals }) => {
  const user = requireApiUser(locals);
  if (user instanceof Response) return user;
  return jsonOk({ user, crew: locals.crew, crews: locals.crews });
};
