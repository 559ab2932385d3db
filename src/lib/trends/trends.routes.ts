/**
 * The request side of the wear chart's endpoint, kept out of the route file so tests can call it with a real
 * database and a plain Request: session and permission, the query, the entity tag (304 when the client holds the
 * same answer, before it is built), the answer kept for that tag or one read of the chart's data, and the compact
 * answer gzipped when accepted.
 */
import type { Kysely } from 'kysely';
import { canReadCrew } from '../auth/permissions';
import type { CrewMembership, SessionUser } from '../auth/types';
import type { Database } from '../db/database';
import { answerPreparedJson, notModified, prepareJson } from '../http/conditional-json';
import { fieldErrorsFrom, jsonError } from '../http/json';
import { getTrendAnswers, type TrendAnswers } from './trend-answers';
import { compactTrendResponse } from './trend-compact';
import { trendQuerySchema } from './trends';
import { findTrendEntityTag, loadMachineTrends } from './trends.service';

export interface TrendRouteContext {
  request: Request;
  machineId: string;
  locals: { user: SessionUser | null; crew: CrewMembership | null };
}

/** GET /api/trends/[machineId]?measurands=Fe,Al&basis=ppm|rate&x=odometer|date. */
export async function answerTrendRequest(
  db: Kysely<Database>,
  ctx: TrendRouteContext,
  answers: TrendAnswers = getTrendAnswers(),
): Promise<Response> {
  const { user, crew } = ctx.locals;
  if (!user) return jsonError(401, 'unauthenticated', 'Sign in to see this machine.');
  if (!canReadCrew(crew)) return jsonError(404, 'not_found', 'No such machine in this crew.');
  const parsed = trendQuerySchema.safeParse(Object.fromEntries(new URL(ctx.request.url).searchParams));
  if (!parsed.success)
    return jsonError(400, 'invalid_input', 'The chart query needs attention.', fieldErrorsFrom(parsed.error));
  // The tag comes first, from a fingerprint of the rows the chart reads: an unchanged chart answers 304 without
  // being built. Taken before the answer, a write in between can only make the tag older than the answer, never
  // newer.
  const etag = await findTrendEntityTag(db, crew.crewId, ctx.machineId, parsed.data);
  const unchanged = etag === null ? null : notModified(ctx.request, etag);
  if (unchanged) return unchanged;
  // An answer already built for this tag is the answer (trend-answers.ts); otherwise build it now.
  let prepared = etag === null ? undefined : answers.get(etag);
  if (!prepared) {
    const data = await loadMachineTrends(db, crew.crewId, ctx.machineId, parsed.data);
    if (!data) return jsonError(404, 'not_found', 'No such machine in this crew.');
    prepared = prepareJson(compactTrendResponse(data), etag ?? undefined);
  }
  const response = await answerPreparedJson(ctx.request, prepared);
  // Kept (again) after answering, so its size counts a gzip made for this request.
  if (etag !== null) answers.keep(prepared);
  return response;
}
