import { describe, expect, test } from 'vitest';
import { createOutboxRetry, RETRY_PAUSES_MS, type RetryTimers } from '~/components/offline/outbox-retry';

/** Timers that run only when told: the pauses asked for are recorded, the pending one is run by `fire`. */
function manualTimers() {
  const asked: number[] = [];
  let pending: (() => void) | null = null;
  let cleared = 0;
  const timers: RetryTimers = {
    set(run, ms) {
      asked.push(ms);
      pending = run;
      return asked.length;
    },
    clear() {
      pending = null;
      cleared += 1;
    },
  };
  const fire = async () => {
    const run = pending;
    pending = null;
    run?.();
    await new Promise((r) => setTimeout(r, 0));
  };
  return { timers, asked, fire, pending: () => pending !== null, cleared: () => cleared };
}

describe('createOutboxRetry', () => {
  test('tries again after 5, 10, 20, 40 s, then every 60 s, until the server is reached', async () => {
    const t = manualTimers();
    const answers = [false, false, false, false, false, false, true];
    let calls = 0;
    const retry = createOutboxRetry(async () => answers[calls++]!, t.timers);
    await retry.run();
    for (let i = 0; i < 6; i += 1) await t.fire();
    expect(calls).toBe(7);
    expect(t.asked).toEqual([5_000, 10_000, 20_000, 40_000, 60_000, 60_000]);
    expect(t.pending()).toBe(false);
    expect(RETRY_PAUSES_MS[0]).toBe(5_000);
  });

  test('a success starts the pauses over, and nothing is scheduled after it', async () => {
    const t = manualTimers();
    const answers = [false, false, true, false];
    let calls = 0;
    const retry = createOutboxRetry(async () => answers[calls++]!, t.timers);
    await retry.run();
    await t.fire();
    await t.fire();
    expect(t.pending()).toBe(false);
    await retry.run();
    expect(t.asked).toEqual([5_000, 10_000, 5_000]);
  });

  test('a send from elsewhere (the online event) replaces the pending try instead of adding one', async () => {
    const t = manualTimers();
    let calls = 0;
    const retry = createOutboxRetry(async () => (calls++, false), t.timers);
    await retry.run();
    await retry.run();
    expect(t.cleared()).toBe(1);
    expect(calls).toBe(2);
    expect(t.asked).toEqual([5_000, 10_000]);
  });

  test('nothing is scheduled when the first send reaches the server', async () => {
    const t = manualTimers();
    const retry = createOutboxRetry(async () => true, t.timers);
    await retry.run();
    expect(t.asked).toEqual([]);
  });
});
