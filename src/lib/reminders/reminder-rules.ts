/**
 * When a reminder is due, and the key that makes it fire once. Pure: dates and "now" are passed in, so the
 * tests move the clock instead of waiting for the schedule.
 */
import { countDaysBetween } from '../home/odometer-estimate';

/** A shipped bottle without results after this many days gets a reminder (a product rule; the home page uses the same 21). */
export { SHIPPED_OVERDUE_DAYS } from '../home/home.service';

/** An invitation not accepted after this many days reminds the crew's leads (a product rule, no published source). */
export const INVITATION_PENDING_DAYS = 7;

/**
 * Invitations older than this are not reminded about at all: the first run after this feature ships must
 * not mail leads about every invitation of the past. Common practice, no published source.
 */
export const INVITATION_REMINDER_HORIZON_DAYS = 30;

export interface DueTargetInput {
  nextSampleOn: string | null;
  nextSampleOdometer: number | null;
  lastChangeOn: string | null;
  lastChangeOdometer: number | null;
  maxIntervalDays: number | null;
  maxIntervalDistance: number | null;
}

export interface DueTarget {
  nextSampleOn: string | null;
  nextSampleOdometer: number | null;
  /** 'call' when the latest interval call set it; 'manufacturer' when only the manual's interval did. */
  source: 'call' | 'manufacturer';
}

/** The machine's next-sample target: the latest interval call's, else the manual's interval from the last oil change (as on the crew home). */
export function deriveSampleTarget(input: DueTargetInput): DueTarget | null {
  if (input.nextSampleOn !== null || input.nextSampleOdometer !== null) {
    return { nextSampleOn: input.nextSampleOn, nextSampleOdometer: input.nextSampleOdometer, source: 'call' };
  }
  const nextSampleOn =
    input.lastChangeOn && input.maxIntervalDays ? addDays(input.lastChangeOn, input.maxIntervalDays) : null;
  const nextSampleOdometer =
    input.lastChangeOdometer !== null && input.maxIntervalDistance !== null
      ? input.lastChangeOdometer + input.maxIntervalDistance
      : null;
  if (nextSampleOn === null && nextSampleOdometer === null) return null;
  return { nextSampleOn, nextSampleOdometer, source: 'manufacturer' };
}

/**
 * The dedupe key of a sample-due reminder: one per machine, target and recipient. The target is the due date
 * and/or the odometer, so a reminder fires once per target, and again only when a new call moves it.
 */
export function buildSampleDueKey(
  machineId: string,
  target: Pick<DueTarget, 'nextSampleOn' | 'nextSampleOdometer'>,
  userId: string,
): string {
  const parts = [
    target.nextSampleOn,
    target.nextSampleOdometer === null ? null : `${Math.round(target.nextSampleOdometer)}u`,
  ].filter((p): p is string => p !== null);
  return `reminder:sample-due:${machineId}:${parts.join('+')}:${userId}`;
}

/** The dedupe key of a shipped-without-results reminder: once per sample and recipient. */
export function buildShippedOverdueKey(sampleId: string, userId: string): string {
  return `reminder:shipped-overdue:${sampleId}:${userId}`;
}

/** The dedupe key of an invitation reminder: once per invitation and lead. */
export function buildInvitationKey(invitationId: string, userId: string): string {
  return `reminder:invitation:${invitationId}:${userId}`;
}

/** Whole days from `shippedOn` (YYYY-MM-DD) to `today`, and whether that reaches the limit. */
export function checkShippedOverdue(
  shippedOn: string,
  today: string,
  days: number,
): { overdue: boolean; daysWaiting: number } {
  const daysWaiting = countDaysBetween(shippedOn, today);
  return { overdue: daysWaiting >= days, daysWaiting };
}

/** Whether an invitation made at `createdAt` has waited at least `days` at `now` and is within the reminder horizon. */
export function checkInvitationPending(
  createdAt: Date,
  now: Date,
  days: number,
  horizonDays: number,
): { pending: boolean; daysWaiting: number } {
  const daysWaiting = Math.floor((now.getTime() - createdAt.getTime()) / 86_400_000);
  return { pending: daysWaiting >= days && daysWaiting <= horizonDays, daysWaiting };
}

/** Adds days to a YYYY-MM-DD date. */
export function addDays(iso: string, days: number): string {
  return new Date(Date.parse(`${iso.slice(0, 10)}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);
}
