import { z } from 'zod';
import { emailSchema } from '../auth/auth';
import { ROLES, type Role } from '../auth/types';

export { ROLES };

export const roleSchema = z.enum(ROLES, 'Choose lead, mechanic or rider.');

export const crewNameSchema = z
  .string({ error: 'Enter a name for the crew.' })
  .trim()
  .min(1, 'Enter a name for the crew.')
  .max(80, 'Use at most 80 characters.');

export const createCrewSchema = z.strictObject({ name: crewNameSchema });
export const inviteSchema = z.strictObject({ email: emailSchema, role: roleSchema });
export const changeRoleSchema = z.strictObject({ role: roleSchema });
export const switchCrewSchema = z.strictObject({ crewId: z.uuid('Choose a crew.') });

/** A member as the crew page lists them. */
export interface CrewMember {
  userId: string;
  displayName: string;
  email: string;
  role: Role;
  joinedAt: Date;
}

/** An open invitation as the crew page lists it. */
export interface PendingInvitation {
  id: string;
  email: string;
  role: Role;
  expiresAt: Date;
  createdAt: Date;
}

/** What the invitation page shows before anyone accepts. */
export interface InvitationView {
  id: string;
  crewId: string;
  crewName: string;
  email: string;
  role: Role;
  state: 'open' | 'expired' | 'used';
}

/** Words for roles in the interface. */
export const ROLE_LABELS: Record<Role, string> = { lead: 'Lead', mechanic: 'Mechanic', rider: 'Rider' };
export const ROLE_HINTS: Record<Role, string> = {
  lead: 'everything in the crew: members, invitations, alert limits, all machines',
  mechanic: 'reads every machine, imports lab reports, writes review notes and interval calls',
  rider: 'adds and edits their own machines, oil changes and drain cards; reads the crew’s machines',
};
