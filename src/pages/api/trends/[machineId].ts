import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { answerTrendRequest } from '~/lib/trends/trends.routes';

/**
 * GET /api/trends/[machineId]?measurands=Fe,Al&basis=ppm|rate&x=odometer|date — the wear chart's data in its
 * compact form (trend-compact.ts), with an entity tag: an unchanged machine answers 304.
 */
export const GET: APIRoute = ({ params, request, locals }) =>
  answerTrendRequest(getDb(), { request, machineId: params.machineId ?? '', locals });
