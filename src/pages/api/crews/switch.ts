import type { APIRoute } from 'astro';
import { getAuthDeps } from '~/lib/auth/deps';
import { requireApiUser, signInRedirect } from '~/lib/auth/guards';
import { switchCrewSchema } from '~/lib/crews/crews';
import { switchCrew } from '~/lib/crews/crews.service';
import { formText, readForm, safeNextPath, wantsPage } from '~/lib/http/form';
import { jsonOk, parseJsonBody } from '~/lib/http/json';
import { refusalJson } from '~/lib/http/responses';

/** Switches the session's crew: a plain form (crewId, next) redirects back; JSON { crewId } answers JSON. */
export const POST: APIRoute = async (context) => {
  if (wantsPage(context.request, { bareForm: 'page' })) {
    const body = await readForm(context.request);
    if (!body.ok) return body.response;
    // A browser whose session ended signs in and comes back to the page the switcher was on.
    if (!context.locals.user) return signInRedirect(new URL(safeNextPath(formText(body.form, 'next')), context.url));
    const parsed = switchCrewSchema.safeParse({ crewId: formText(body.form, 'crewId') });
    if (!parsed.success) return new Response('Choose a crew.', { status: 400 });
    const result = await switchCrew(
      getAuthDeps().db,
      context.locals.session!.id,
      context.locals.user.id,
      parsed.data.crewId,
    );
    if (!result.ok) return new Response(null, { status: 404 });
    return context.redirect(safeNextPath(formText(body.form, 'next')), 303);
  }
  const user = requireApiUser(context.locals);
  if (user instanceof Response) return user;
  const body = await parseJsonBody(context.request, switchCrewSchema);
  if (!body.ok) return body.response;
  const result = await switchCrew(getAuthDeps().db, context.locals.session!.id, user.id, body.data.crewId);
  if (!result.ok) return refusalJson(result);
  return jsonOk({ crew: result.value.crew });
};
