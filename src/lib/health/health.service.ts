import type { Kysely } from 'kysely';
import { pingDatabase } from './health.repository';

/** What /api/health tells anyone who asks: no error text, which could name hosts, users or versions. */
export interface HealthReport {
  status: 'ok' | 'unavailable';
  version: string;
  database: { reachable: boolean; latencyMs?: number };
}

/**
 * Asks the database for `select 1` within `timeoutMs`; never throws. The reason of a failure goes to
 * `onFailure` (the server log), never into the report.
 */
export async function checkHealth(
  db: Kysely<any>,
  version: string,
  onFailure: (reason: string) => void = () => {},
  timeoutMs = 2_000,
): Promise<HealthReport> {
  const started = performance.now();
  let timer: NodeJS.Timeout | undefined;
  try {
    await Promise.race([
      pingDatabase(db),
      new Promise((_, reject) => {
        timer = setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs);
      }),
    ]);
    return {
      status: 'ok',
      version,
      database: { reachable: true, latencyMs: Math.round((performance.now() - started) * 10) / 10 },
    };
  } catch (error) {
    onFailure(error instanceof Error ? error.message || error.name : 'unknown error');
    return { status: 'unavailable', version, database: { reachable: false } };
  } finally {
    clearTimeout(timer);
  }
}
