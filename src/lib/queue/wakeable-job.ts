/**
 * A pg-boss job that runs when woken: a NOTIFY on a channel (a committed write), a periodic tick (work that
 * fell due, or was missed while the listener reconnected) and the worker's own start (catch-up after
 * downtime). Used by the mail outbox flush and the inbound lab mail.
 */
import pg from 'pg';
import type PgBoss from 'pg-boss';
import type { JobRegistration } from './job-queue';

export interface WakeableJobOptions<T> {
  /** The queue, already created with its policy. */
  name: string;
  listen?: { connectionString: string; channel: string };
  tickSeconds: number;
  pollingIntervalSeconds: number;
  log: (line: string) => void;
  /** One run; `moreWaiting` queues the next run at once instead of at the next tick. */
  run: () => Promise<{ result: T; moreWaiting: boolean }>;
}

/** Works the queue `name` and wakes it as described above; stop() ends the timers, the listener and the worker. */
export async function registerWakeableJob<T>(boss: PgBoss, options: WakeableJobOptions<T>): Promise<JobRegistration> {
  let stopped = false;
  let workerId: string | undefined;
  const trigger = async (): Promise<void> => {
    if (stopped) return;
    try {
      await boss.send(options.name, {});
      if (workerId) boss.notifyWorker(workerId);
    } catch (error) {
      options.log(`[queue] could not queue ${options.name}: ${errorMessage(error)}`);
    }
  };
  workerId = await boss.work(options.name, { pollingIntervalSeconds: options.pollingIntervalSeconds }, async () => {
    const { result, moreWaiting } = await options.run();
    if (moreWaiting) void trigger();
    return result;
  });
  const listener = options.listen
    ? listenForChannel(options.listen.connectionString, options.listen.channel, () => void trigger(), options.log)
    : undefined;
  const tick = setInterval(() => void trigger(), options.tickSeconds * 1000);
  tick.unref();
  // Catch up on whatever was written while no worker was running.
  await trigger();
  return {
    name: options.name,
    async stop() {
      stopped = true;
      clearInterval(tick);
      await listener?.close();
      await boss.offWork(options.name);
    },
  };
}

/** LISTENs on a channel (the outbox's, the inbound mail's) with its own connection, reconnecting after a lost connection. */
export function listenForChannel(
  connectionString: string,
  channel: string,
  onNotify: () => void,
  log: (line: string) => void,
) {
  let client: pg.Client | undefined;
  let closed = false;
  let retry: NodeJS.Timeout | undefined;

  const connect = async (): Promise<void> => {
    const c = new pg.Client({ connectionString, application_name: 'sumpwise-mail-listener' });
    c.on('notification', onNotify);
    c.on('error', (error) => {
      log(`[queue] listener on ${channel} lost its connection: ${error.message}; the tick still runs`);
      void c.end().catch(() => {});
      scheduleReconnect();
    });
    try {
      await c.connect();
      await c.query(`LISTEN ${channel}`);
      if (closed) {
        await c.end();
        return;
      }
      client = c;
      // Anything committed while we were not listening.
      onNotify();
    } catch (error) {
      log(`[queue] listener on ${channel} could not connect: ${errorMessage(error)}`);
      void c.end().catch(() => {});
      scheduleReconnect();
    }
  };
  const scheduleReconnect = () => {
    client = undefined;
    if (closed || retry) return;
    retry = setTimeout(() => {
      retry = undefined;
      void connect();
    }, 5_000);
    retry.unref();
  };
  void connect();

  return {
    async close() {
      closed = true;
      if (retry) clearTimeout(retry);
      await client?.end().catch(() => {});
    },
  };
}

function errorMessage(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}
