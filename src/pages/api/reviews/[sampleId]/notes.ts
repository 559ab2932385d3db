import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { reviewNoteSchema } from '~/lib/reviews/reviews';
import { addReviewNote } from '~/lib/reviews/reviews.service';
import { failure, readReviewBody, refuseSignedOut, success } from '../_respond';

/** POST /api/reviews/[sampleId]/notes — a mechanic's or lead's note (JSON, or a plain form that comes back to the page). */
export const POST: APIRoute = async (context) => {
  const { params, request, locals } = context;
  const sampleId = params.sampleId ?? '';
  const back = `/samples/${encodeURIComponent(sampleId)}`;
  if (!locals.user) return refuseSignedOut(request, back, 'Sign in to write review notes.');
  const body = await readReviewBody(request, reviewNoteSchema, back);
  if (!body.ok) return body.response;
  const result = await addReviewNote(
    getDb(),
    { userId: locals.user.id, membership: locals.crew },
    sampleId,
    body.data.body,
  );
  if (!result.ok) return failure(context, body.form, back, result.status, result.code, result.message);
  return success(body.form, back, 'note', result.value);
};
