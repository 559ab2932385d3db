import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { jsonOk } from '~/lib/http/json';
import { steadyUndoSchema } from '~/lib/reviews/reviews';
import { undoSteadyConfirmations } from '~/lib/reviews/reviews.service';
import { backToQueue, queueFailure, readReviewBody, refuseSignedOut } from '../_respond';

/** POST /api/reviews/steady-calls/undo — take back one step's confirmations within the few seconds offered. */
export const POST: APIRoute = async (context) => {
  const { request, locals } = context;
  if (!locals.user) return refuseSignedOut(request, '/', 'Sign in to confirm interval calls.');
  const body = await readReviewBody(request, steadyUndoSchema, '/');
  if (!body.ok) return body.response;
  const r = await undoSteadyConfirmations(
    getDb(),
    { userId: locals.user.id, membership: locals.crew },
    body.data.callIds,
  );
  if (!r.ok) return queueFailure(context, body.form, r);
  return body.form ? backToQueue({ steady_undone: String(r.value.undone) }) : jsonOk(r.value);
};
