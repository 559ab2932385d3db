/**
 * Pauses between tries while the server cannot be reached: quick at first, then once a minute (common practice,
 * no published source).
 */
export const RETRY_PAUSES_MS = [5_000, 10_000, 20_000, 40_000, 60_000] as const;

export interface RetryTimers {
  set(run: () => void, ms: number): unknown;
  clear(handle: unknown): void;
}

const browserTimers: RetryTimers = {
  set: (run, ms) => setTimeout(run, ms),
  clear: (handle) => clearTimeout(handle as ReturnType<typeof setTimeout>),
};

/**
 * Sends the outbox, and again after a growing pause for as long as the server cannot be reached. The browser's
 * online flag is no proof of a connection (a garage Wi-Fi with no way out reads as online, and the 'online' event
 * then never comes), so a page that only waited for that event could hold a rider's writes until the next page
 * load. `send` answers true when the server was reached or there is no reason to try again soon.
 */
export function createOutboxRetry(send: () => Promise<boolean>, timers: RetryTimers = browserTimers) {
  let handle: unknown;
  let step = 0;
  async function run(): Promise<void> {
    if (handle !== undefined) timers.clear(handle);
    handle = undefined;
    if (await send()) {
      step = 0;
      return;
    }
    handle = timers.set(() => void run(), RETRY_PAUSES_MS[Math.min(step, RETRY_PAUSES_MS.length - 1)]!);
    step += 1;
  }
  return { run };
}
