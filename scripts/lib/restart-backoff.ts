// How long the supervisor waits before replacing an app process that died (common practice, no published
// source): one that ran a while is replaced at once; one that dies right after starting, again and again,
// waits twice as long each time, from 250 ms up to 10 s, so a crash at start-up does not spin the CPU.

/** A process that lived less than this counts as dying at start-up. */
export const QUICK_DEATH_MS = 5_000;
const FIRST_DELAY_MS = 250;
const MAX_DELAY_MS = 10_000;

/** The count of start-up deaths in a row after one more death, and the pause before the next start. */
export function nextRestart(quickDeathsBefore: number, livedMs: number): { quickDeaths: number; delayMs: number } {
  const quickDeaths = livedMs < QUICK_DEATH_MS ? quickDeathsBefore + 1 : 0;
  const delayMs = quickDeaths === 0 ? 0 : Math.min(MAX_DELAY_MS, FIRST_DELAY_MS * 2 ** (quickDeaths - 1));
  return { quickDeaths, delayMs };
}
