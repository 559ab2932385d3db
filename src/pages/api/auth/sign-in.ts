import type { APIRoute } from 'astro';
import { signInSchema } from '~/lib/auth/auth';
import { signIn } from '~/lib/auth/auth.service';
import { applySessionCookie, clientIp, getAuthDeps, isKnownDeviceFor, rememberKnownDevice } from '~/lib/auth/deps';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { refusalJson } from '~/lib/http/responses';

/** Signs in with { email, password }; sets the session cookie. */
export const POST: APIRoute = async (context) => {
  const body = await parseJsonBody(context.request, signInSchema);
  if (!body.ok) return body.response;
  const result = await signIn(getAuthDeps(), body.data, {
    ip: clientIp(context),
    previousSessionId: context.locals.session?.id ?? null,
    knownDevice: isKnownDeviceFor(context.cookies, body.data.email),
  });
  if (!result.ok) return refusalJson(result);
  applySessionCookie(context.cookies, result.value.cookie);
  rememberKnownDevice(context.cookies, body.data.email);
  return jsonOk({ userId: result.value.userId });
};
