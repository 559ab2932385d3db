// The background worker: starts pg-boss on DATABASE_URL and runs every registered job family (mail
// delivery now; reminders and digests later) until SIGTERM or SIGINT, then stops gracefully.
// Usage: `npm run worker` after `npm run build` (its bundle, dist/server/worker.mjs), or node --import tsx
// scripts/worker.ts from the sources.
import { readConfig } from '../src/lib/config';
import { createDb } from '../src/lib/db/db';
import { createMailTransport } from '../src/lib/mail/transport';
import { startJobQueue, stopJobQueue } from '../src/lib/queue/job-queue';
import { registerJobs } from '../src/lib/queue/jobs';

const config = readConfig();
const db = createDb(config.DATABASE_URL, { max: config.WORKER_POOL_SIZE });
const transport = createMailTransport(config.SMTP_URL);
const log = (line: string) => console.log(line);

let boss: Awaited<ReturnType<typeof startJobQueue>>;
try {
  boss = await startJobQueue({
    connectionString: config.DATABASE_URL,
    onError: (e) => console.error(`[worker] queue: ${e.message}`),
  });
} catch (error) {
  console.error(`[worker] cannot start the job queue: ${error instanceof Error ? error.message : String(error)}`);
  await db.destroy();
  process.exit(1);
}
const registrations = await registerJobs(boss, { db, config, transport, log });
const relayHost = new URL(config.SMTP_URL).host;
console.log(`[worker] running jobs: ${registrations.map((r) => r.name).join(', ')} (mail relay ${relayHost})`);

let stopping = false;
const stop = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  console.log(`[worker] ${signal}: finishing running jobs…`);
  await stopJobQueue(boss, registrations);
  transport.close();
  await db.destroy();
  console.log('[worker] stopped');
  process.exit(0);
};
process.once('SIGTERM', () => void stop('SIGTERM'));
process.once('SIGINT', () => void stop('SIGINT'));
