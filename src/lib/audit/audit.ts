/** Security events, and changes to what the analysis trusts (a machine's baseline), kept in the audit log. */
export const AUDIT_KINDS = [
  'sign_in',
  'sign_in_failed',
  'sign_out',
  'sign_up',
  'password_changed',
  'password_reset',
  'email_verified',
  'crew_created',
  'role_changed',
  'member_removed',
  'member_left',
  'invitation_sent',
  'invitation_revoked',
  'invitation_accepted',
  'new_oil_reference_saved',
  'new_oil_reference_deleted',
  'import_address_rotated',
  'import_sender_added',
  'import_sender_removed',
  'baseline_excluded',
  'baseline_restored',
  'alert_limits_changed',
  'steady_calls_confirmed',
  'steady_calls_unconfirmed',
] as const;
export type AuditKind = (typeof AUDIT_KINDS)[number];

/** What a caller records. */
export interface AuditEventInput {
  kind: AuditKind;
  crewId?: string | null;
  actorUserId?: string | null;
  subjectUserId?: string | null;
  detail?: Record<string, unknown>;
  ip?: string | null;
}

/** One line of the log as a lead sees it. */
export interface AuditEvent {
  id: number;
  kind: AuditKind;
  at: Date;
  actorName: string | null;
  subjectName: string | null;
  detail: Record<string, unknown>;
  ip: string | null;
}

/** Words for each kind, shown in the crew's log. */
export const AUDIT_LABELS: Record<AuditKind, string> = {
  sign_in: 'Signed in',
  sign_in_failed: 'Failed sign-in',
  sign_out: 'Signed out',
  sign_up: 'Signed up',
  password_changed: 'Password changed',
  password_reset: 'Password reset by e-mail link',
  email_verified: 'E-mail address verified',
  crew_created: 'Crew created',
  role_changed: 'Role changed',
  member_removed: 'Member removed',
  member_left: 'Member left',
  invitation_sent: 'Invitation sent',
  invitation_revoked: 'Invitation withdrawn',
  invitation_accepted: 'Invitation accepted',
  new_oil_reference_saved: 'New-oil reference saved',
  new_oil_reference_deleted: 'New-oil reference deleted',
  import_address_rotated: 'Import address replaced',
  import_sender_added: 'Lab address added to the import list',
  import_sender_removed: 'Lab address removed from the import list',
  baseline_excluded: 'Sample taken out of the baseline',
  baseline_restored: 'Sample put back in the baseline',
  alert_limits_changed: 'Alert limits changed',
  steady_calls_confirmed: 'Steady calls confirmed in one step',
  steady_calls_unconfirmed: 'Confirmation of steady calls undone',
};
