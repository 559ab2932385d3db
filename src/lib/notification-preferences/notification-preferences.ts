import { z } from 'zod';
import type { NotificationDelivery, NotificationKind } from '../db/database';

// The kinds of e-mail Sumpwise sends on its own and how each may be delivered. Account e-mails
// (verification, password reset, invitations) are not here: they answer something the user just did.

export type { NotificationDelivery, NotificationKind };

export const NOTIFICATION_KINDS: readonly NotificationKind[] = [
  'import_findings',
  'lab_report_arrived',
  'sample_due',
  'shipped_overdue',
  'invitation_pending',
];
export const NOTIFICATION_DELIVERIES: readonly NotificationDelivery[] = ['immediate', 'digest', 'off'];

/** What each kind is, in the words of the preferences page and the mails. */
export const KIND_LABELS: Record<NotificationKind, { title: string; hint: string }> = {
  import_findings: {
    title: 'Findings from a lab import',
    hint: 'When a lab import brings a finding at watch or act on a machine you ride or look after.',
  },
  lab_report_arrived: {
    title: 'Lab report arrived by mail',
    hint: "When a lab mails a report to the crew's import address and it waits for a confirm (leads and mechanics).",
  },
  sample_due: {
    title: 'Next sample due',
    hint: 'When a machine reaches its next sample, by date or by the odometer estimated from recent riding.',
  },
  shipped_overdue: {
    title: 'Shipped bottle without results',
    hint: 'When a bottle was shipped three weeks ago and no results came in.',
  },
  invitation_pending: {
    title: 'Invitation not accepted',
    hint: 'When someone you invited to the crew has not accepted after a week (leads only).',
  },
};

export const DELIVERY_LABELS: Record<NotificationDelivery, string> = {
  immediate: 'Right away',
  digest: 'In a daily digest',
  off: 'Off',
};

/** Every kind starts as "right away": a rider who signs up should hear about an act finding without setup. */
export const DEFAULT_DELIVERY: Record<NotificationKind, NotificationDelivery> = {
  import_findings: 'immediate',
  lab_report_arrived: 'immediate',
  sample_due: 'immediate',
  shipped_overdue: 'immediate',
  invitation_pending: 'immediate',
};

export const notificationKindSchema = z.enum([
  'import_findings',
  'lab_report_arrived',
  'sample_due',
  'shipped_overdue',
  'invitation_pending',
]);
export const notificationDeliverySchema = z.enum(['immediate', 'digest', 'off']);

/** One choice as the preferences form sends it: field `pref.<crewId>.<kind>` = delivery. */
export const preferenceChoiceSchema = z.object({
  crewId: z.uuid(),
  kind: notificationKindSchema,
  delivery: notificationDeliverySchema,
});
export type PreferenceChoice = z.infer<typeof preferenceChoiceSchema>;

/** The form field name of one crew's choice for one kind. */
export function buildPreferenceFieldName(crewId: string, kind: NotificationKind): string {
  return `pref.${crewId}.${kind}`;
}

/**
 * Reads the preference choices out of a submitted form; unknown fields are ignored, malformed `pref.` fields
 * are reported by name so the page can say which one.
 */
export function parsePreferenceForm(form: URLSearchParams): {
  choices: PreferenceChoice[];
  errors: Record<string, string>;
} {
  const choices: PreferenceChoice[] = [];
  const errors: Record<string, string> = {};
  for (const [name, value] of form) {
    const m = /^pref\.([^.]+)\.([a-z_]+)$/.exec(name);
    if (!m) continue;
    const parsed = preferenceChoiceSchema.safeParse({ crewId: m[1], kind: m[2], delivery: value });
    if (parsed.success) choices.push(parsed.data);
    else errors[name] = 'Choose right away, daily digest or off.';
  }
  return { choices, errors };
}
