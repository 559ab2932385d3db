/** What the sample page leads with, by the sample's state. Pure: no database, no Astro. */
import { checkShippedOverdue, SHIPPED_OVERDUE_DAYS } from '../reminders/reminder-rules';
import type { SampleState } from './samples';

/** The page's one filled button: print the tag just after registering, then ship, then confirm the call. */
export type SamplePrimary = 'tag' | 'ship' | 'confirm' | null;

/**
 * Picks the filled button. Tag prints are not recorded, so the tag leads only on the page the drain card
 * lands on (`registered`); a drawn bottle otherwise asks to be shipped, results ask for a reviewer's call.
 */
export function pickSamplePrimary(state: SampleState, registered: boolean, mayReview: boolean): SamplePrimary {
  if (state === 'drawn') return registered ? 'tag' : 'ship';
  if (state === 'results_in') return mayReview ? 'confirm' : null;
  return null;
}

/**
 * "Shipped 30 days ago and no results yet" once a shipped bottle has waited SHIPPED_OVERDUE_DAYS (the home page's
 * and the reminders' limit); null otherwise.
 */
export function describeShippedWait(state: SampleState, shippedOn: string | null, today: string): string | null {
  if (state !== 'shipped' || !shippedOn) return null;
  const { overdue, daysWaiting } = checkShippedOverdue(shippedOn, today, SHIPPED_OVERDUE_DAYS);
  if (!overdue) return null;
  return `Shipped ${daysWaiting} days ago and no results yet. Labs usually report within a few weeks: ask the lab whether the bottle arrived, and check the code on its tag.`;
}
