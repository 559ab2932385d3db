import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { jsonOk } from '~/lib/http/json';
import { UNDO_SECONDS, steadyConfirmSchema } from '~/lib/reviews/reviews';
import { confirmSteadyCalls } from '~/lib/reviews/reviews.service';
import { backToQueue, queueFailure, readReviewBody, refuseSignedOut } from '../_respond';

/** POST /api/reviews/steady-calls — confirm every steady hold or stretch call waiting for review, in one step. */
export const POST: APIRoute = async (context) => {
  const { request, locals } = context;
  if (!locals.user) return refuseSignedOut(request, '/', 'Sign in to confirm interval calls.');
  const body = await readReviewBody(request, steadyConfirmSchema, '/');
  if (!body.ok) return body.response;
  const r = await confirmSteadyCalls(getDb(), { userId: locals.user.id, membership: locals.crew });
  if (!r.ok) return queueFailure(context, body.form, r);
  if (body.form) return backToQueue({ steady_confirmed: String(r.value.confirmed), undo: r.value.callIds.join(',') });
  return jsonOk({ ...r.value, undoSeconds: UNDO_SECONDS }, 201);
};
