import type { APIRoute } from 'astro';
import { clientIp } from '~/lib/auth/deps';
import { getDb } from '~/lib/db';
import { baselineChoiceSchema } from '~/lib/reviews/reviews';
import { changeSampleBaseline } from '~/lib/reviews/reviews.service';
import { failure, readReviewBody, refuseSignedOut, success } from '../_respond';

/** POST /api/reviews/[sampleId]/baseline — take a sample out of its machine's baseline, or put it back, with a reason. */
export const POST: APIRoute = async (context) => {
  const { params, request, locals } = context;
  const sampleId = params.sampleId ?? '';
  const back = `/samples/${encodeURIComponent(sampleId)}`;
  if (!locals.user) return refuseSignedOut(request, back, 'Sign in to change the baseline.');
  const body = await readReviewBody(request, baselineChoiceSchema, back);
  if (!body.ok) return body.response;
  const actor = { userId: locals.user.id, membership: locals.crew, ip: clientIp(context) };
  const result = await changeSampleBaseline(getDb(), actor, sampleId, body.data);
  if (!result.ok) return failure(context, body.form, back, result.status, result.code, result.message);
  return success(body.form, back, body.data.action === 'exclude' ? 'baseline-out' : 'baseline-in', result.value);
};
