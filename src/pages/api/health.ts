import type { APIRoute } from 'astro';
import { getDb } from '../../lib/db';
import { checkHealth } from '../../lib/health/health.service';
import { APP_VERSION } from '../../lib/version';

/** App version and database reachability; 503 with the reason when the database is down. */
export const GET: APIRoute = async () => {
  const report = await checkHealth(getDb(), APP_VERSION);
  return new Response(JSON.stringify(report), {
    status: report.status === 'ok' ? 200 : 503,
    headers: { 'content-type': 'application/json', 'cache-control': 'no-store' },
  });
};
