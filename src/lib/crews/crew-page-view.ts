/**
 * What the crew page shows: members with the choices a lead has, open invitations and the security log, in
 * words. Pure: no database, no Astro.
 */
import { AUDIT_LABELS, type AuditEvent } from '../audit/audit';
import type { Role } from '../auth/types';
import { formatMoment } from '../words/dates';
import { ROLE_HINTS, ROLE_LABELS, ROLES, type CrewMember, type PendingInvitation } from './crews';

export interface CrewPageInput {
  userId: string;
  role: Role;
  /** True when the viewer may manage the crew (a lead). */
  lead: boolean;
  members: readonly CrewMember[];
  invitations: readonly PendingInvitation[];
  audit: readonly AuditEvent[];
  /** The viewer's zone; times show in UTC without one. */
  timeZone?: string | null;
}

export interface CrewPageView {
  roleWord: string;
  roleHint: string;
  lead: boolean;
  members: {
    userId: string;
    email: string;
    name: string;
    /** "Ada (you)" for the viewer. */
    label: string;
    roleLabel: string;
    roles: { value: Role; label: string; selected: boolean }[];
    removeLabel: 'Leave crew' | 'Remove';
  }[];
  invitations: { id: string; text: string }[];
  audit: { when: string; event: string; who: string; detail: string }[];
}

/** Who did it, and to whom when that is someone else: "Ada → Ben", "Ada", or "—". */
export function describeAuditWho(e: Pick<AuditEvent, 'actorName' | 'subjectName'>): string {
  const who = e.actorName ?? e.subjectName ?? '—';
  return e.subjectName && e.actorName && e.subjectName !== e.actorName ? `${who} → ${e.subjectName}` : who;
}

/** An audit event's detail as "key: value" pairs. */
export function describeAuditDetail(detail: Record<string, unknown>): string {
  return Object.entries(detail)
    .map(([k, v]) => `${k}: ${String(v)}`)
    .join(', ');
}

/** The crew page's model. */
export function buildCrewPageView(input: CrewPageInput): CrewPageView {
  return {
    roleWord: ROLE_LABELS[input.role].toLowerCase(),
    roleHint: ROLE_HINTS[input.role],
    lead: input.lead,
    members: input.members.map((m) => ({
      userId: m.userId,
      email: m.email,
      name: m.displayName,
      label: `${m.displayName}${m.userId === input.userId ? ' (you)' : ''}`,
      roleLabel: ROLE_LABELS[m.role],
      roles: ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r], selected: r === m.role })),
      removeLabel: m.userId === input.userId ? 'Leave crew' : 'Remove',
    })),
    invitations: input.invitations.map((i) => ({
      id: i.id,
      text: `${i.email} · ${ROLE_LABELS[i.role]} · until ${formatMoment(i.expiresAt, input.timeZone)}`,
    })),
    audit: input.audit.map((e) => ({
      when: formatMoment(e.at, input.timeZone),
      event: AUDIT_LABELS[e.kind] ?? e.kind,
      who: describeAuditWho(e),
      detail: describeAuditDetail(e.detail),
    })),
  };
}
