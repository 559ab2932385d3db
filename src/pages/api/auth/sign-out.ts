import type { APIRoute } from 'astro';
import { signOut } from '~/lib/auth/auth.service';
import { applySessionCookie, clientIp, getAuthDeps } from '~/lib/auth/deps';
import { requireApiUser } from '~/lib/auth/guards';

/** Ends the current session; 204. */
export const POST: APIRoute = async (context) => {
  const user = requireApiUser(context.locals);
  if (user instanceof Response) return user;
  applySessionCookie(
    context.cookies,
    await signOut(getAuthDeps(), { id: context.locals.session!.id, userId: user.id }, { ip: clientIp(context) }),
  );
  return new Response(null, { status: 204 });
};
