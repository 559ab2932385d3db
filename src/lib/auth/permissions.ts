import type { Role } from '../db/database';
import type { CrewMembership } from './types';

// Every permission decision lives here; pages and endpoints call these, never compare roles themselves.
// A record of another crew is never "forbidden" but "not found": callers load records scoped by crew id.

const ROLES_THAT_READ: readonly Role[] = ['lead', 'mechanic', 'rider'];

function hasRole(m: CrewMembership | null, roles: readonly Role[]): m is CrewMembership {
  return m !== null && roles.includes(m.role);
}

/** Any member reads every machine, sample and finding of their crew. */
export function canReadCrew(m: CrewMembership | null): m is CrewMembership {
  return hasRole(m, ROLES_THAT_READ);
}

/** Leads manage members, invitations, alert limits and the crew's name. */
export function canManageCrew(m: CrewMembership | null): m is CrewMembership {
  return hasRole(m, ['lead']);
}

/** Leads and riders add machines (a rider's machine is their own); mechanics only read them. */
export function canCreateMachine(m: CrewMembership | null): m is CrewMembership {
  return hasRole(m, ['lead', 'rider']);
}

/** Leads edit every machine; a rider edits the machines they own (oil changes, drain cards, wear parts). */
export function canEditMachine(m: CrewMembership | null, machine: { ownerUserId: string }, userId: string): boolean {
  if (!m) return false;
  if (m.role === 'lead') return true;
  return m.role === 'rider' && machine.ownerUserId === userId;
}

/** Every member records the crew's new-oil references (the oil as poured, from a data sheet or a lab bottle). */
export function canRecordNewOilReference(m: CrewMembership | null): m is CrewMembership {
  return hasRole(m, ['lead', 'mechanic', 'rider']);
}

/** Leads and mechanics import lab reports. */
export function canImportLabReport(m: CrewMembership | null): m is CrewMembership {
  return hasRole(m, ['lead', 'mechanic']);
}

/** Leads and mechanics write review notes and confirm or override interval calls. */
export function canReviewSample(m: CrewMembership | null): m is CrewMembership {
  return hasRole(m, ['lead', 'mechanic']);
}

/**
 * Leads and mechanics confirm every steady hold or stretch call waiting for review in one step (and undo it):
 * the same people who confirm one call, since each confirmation is the same review.
 */
export function canConfirmSteadyCalls(m: CrewMembership | null): m is CrewMembership {
  return canReviewSample(m);
}

/** Leads edit the crew's fixed alert limits. */
export function canEditLimits(m: CrewMembership | null): m is CrewMembership {
  return hasRole(m, ['lead']);
}

/** Leads replace the crew's import address and keep its list of lab addresses; mechanics see both. */
export function canManageImportAddress(m: CrewMembership | null): m is CrewMembership {
  return hasRole(m, ['lead']);
}
