import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { callDecisionSchema } from '~/lib/reviews/reviews';
import { decideIntervalCall } from '~/lib/reviews/reviews.service';
import { failure, readReviewBody, refuseSignedOut, success } from '../_respond';

/** POST /api/reviews/[sampleId]/call — confirm the interval call, or override it with a note. */
export const POST: APIRoute = async (context) => {
  const { params, request, locals } = context;
  const sampleId = params.sampleId ?? '';
  const back = `/samples/${encodeURIComponent(sampleId)}`;
  if (!locals.user) return refuseSignedOut(request, back, 'Sign in to decide interval calls.');
  const body = await readReviewBody(request, callDecisionSchema, back);
  if (!body.ok) return body.response;
  const result = await decideIntervalCall(
    getDb(),
    { userId: locals.user.id, membership: locals.crew },
    sampleId,
    body.data,
  );
  if (!result.ok) return failure(context, body.form, back, result.status, result.code, result.message);
  return success(body.form, back, body.data.action, result.value.entry);
};
