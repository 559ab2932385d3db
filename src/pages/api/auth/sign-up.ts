import type { APIRoute } from 'astro';
import { signUpSchema } from '~/lib/auth/auth';
import { signUp } from '~/lib/auth/auth.service';
import { applySessionCookie, clientIp, getAuthDeps } from '~/lib/auth/deps';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { refusalJson } from '~/lib/http/responses';

/** Creates an account from { email, password, displayName?, invitation? }; 201 with the session cookie. */
export const POST: APIRoute = async (context) => {
  const body = await parseJsonBody(context.request, signUpSchema);
  if (!body.ok) return body.response;
  const result = await signUp(getAuthDeps(), body.data, { ip: clientIp(context) });
  if (!result.ok) return refusalJson(result);
  applySessionCookie(context.cookies, result.value.cookie);
  return jsonOk({ userId: result.value.userId, crewId: result.value.crewId }, 201);
};
