import { sql, type Kysely } from 'kysely';

export interface HealthReport {
  status: 'ok' | 'unavailable';
  version: string;
  database: { reachable: boolean; latencyMs?: number; reason?: string };
}

/** Asks the database for `select 1` within `timeoutMs`; never throws. */
export async function checkHealth(db: Kysely<any>, version: string, timeoutMs = 2_000): Promise<HealthReport> {
  const started = performance.now();
  let timer: NodeJS.Timeout | undefined;
  try {
    await Promise.race([
      sql`select 1`.execute(db),
      new Promise((_, reject) => { timer = setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs); }),
    ]);
    return { status: 'ok', version, database: { reachable: true, latencyMs: Math.round((performance.now() - started) * 10) / 10 } };
  } catch (error) {
    const reason = error instanceof Error ? error.message || error.name : 'unknown error';
    return { status: 'unavailable', version, database: { reachable: false, reason } };
  } finally {
    clearTimeout(timer);
  }
}
