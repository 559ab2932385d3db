import PgBoss from 'pg-boss';

// pg-boss keeps its jobs in its own schema of the application database, so a job written there survives
// restarts of the worker and of PostgreSQL, and every worker process shares one queue.

export interface JobQueueOptions {
  connectionString: string;
  /** pg-boss's schema; tests use their own so they never touch the dev queue. */
  schema?: string;
  /** Pool size of pg-boss's own connections. */
  max?: number;
  /** Called for errors pg-boss reports in the background (a lost connection, a failed maintenance run). */
  onError?: (error: Error) => void;
}

/** A job family that registered itself on a started queue; stop() ends its timers and listeners. */
export interface JobRegistration {
  name: string;
  stop(): Promise<void>;
}

export const DEFAULT_JOB_SCHEMA = 'pgboss';

/** Starts pg-boss on the database (creating or migrating its schema) and returns it. */
export async function startJobQueue(options: JobQueueOptions): Promise<PgBoss> {
  const boss = new PgBoss({
    connectionString: options.connectionString,
    schema: options.schema ?? DEFAULT_JOB_SCHEMA,
    max: options.max ?? 4,
    application_name: 'sumpwise-worker',
  });
  // Without a listener an 'error' event would crash the process; pg-boss recovers by itself.
  boss.on('error', (error) => (options.onError ?? defaultOnError)(error));
  await boss.start();
  return boss;
}

/** Stops the job families, then pg-boss, letting running jobs finish (up to timeoutMs). */
export async function stopJobQueue(boss: PgBoss, registrations: JobRegistration[], timeoutMs = 30_000): Promise<void> {
  for (const r of registrations) await r.stop();
  await boss.stop({ graceful: true, wait: true, timeout: timeoutMs });
}

function defaultOnError(error: Error): void {
  console.error(`[queue] ${error.message}`);
}

export type { PgBoss };
