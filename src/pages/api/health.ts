import type { APIRoute } from 'astro';
import { getDb } from '~/lib/db';
import { checkHealth } from '~/lib/health/health.service';
import { logDatabaseUnavailable } from '~/lib/http/unavailable';
import { APP_VERSION } from '~/lib/version';

/** App version and database reachability; 503 "unavailable" when the database is down (the reason is logged). */
export const GET: APIRoute = async () => {
  const report = await checkHealth(getDb(), APP_VERSION, (reason) => logDatabaseUnavailable('health', reason));
  return new Response(JSON.stringify(report), {
    status: report.status === 'ok' ? 200 : 503,
    headers: { 'content-type': 'application/json', 'cache-control': 'no-store' },
  });
};
