import { z } from 'zod';
import type { NotificationKind } from '../db/database';

/** The `kind` each alert carries in the mail outbox (and the X-Sumpwise-Kind header). */
export const MAIL_KIND: Record<NotificationKind | 'digest', string> = {
  import_findings: 'alert_import_findings',
  lab_report_arrived: 'alert_lab_report_arrived',
  sample_due: 'reminder_sample_due',
  shipped_overdue: 'reminder_shipped_overdue',
  invitation_pending: 'reminder_invitation_pending',
  digest: 'alert_digest',
};

/** What an unsubscribe link stops, in words, for the mail footer and the unsubscribe page. */
export function describeUnsubscribeScope(kind: NotificationKind | 'digest', crewName: string | null): string {
  const of = crewName ? ` of ${crewName}` : '';
  switch (kind) {
    case 'import_findings':
      return `e-mails about findings from lab imports${of}`;
    case 'lab_report_arrived':
      return `e-mails about lab reports that arrived by mail${of}`;
    case 'sample_due':
      return `next-sample-due reminders${of}`;
    case 'shipped_overdue':
      return `reminders about shipped bottles without results${of}`;
    case 'invitation_pending':
      return `reminders about invitations not accepted${of}`;
    case 'digest':
      return 'the daily digest';
  }
}

/** Where links in alerts point and what signs the unsubscribe tokens. */
export interface AlertEnv {
  publicUrl: string;
  secret: string;
}

/** How one recipient's alert went: queued now, filed for the digest, or not at all (and why). */
export type AlertOutcome = 'immediate' | 'digest' | 'off' | 'duplicate' | 'unconfirmed';

const addressSchema = z.email().max(254);

/** True when the outbox will accept this address (an account address saved before stricter checks may not). */
export function isDeliverableAddress(email: string): boolean {
  return addressSchema.safeParse(email).success;
}

/** Today's date in UTC as YYYY-MM-DD: the day of a digest and of the reminder checks. */
export function formatUtcDay(now: Date): string {
  return now.toISOString().slice(0, 10);
}
