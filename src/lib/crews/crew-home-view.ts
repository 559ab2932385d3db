/**
 * What `/crews` opens on: the crew the user works in now (members, roles, a lead's open invitations and the
 * Invite button), then the user's other crews, and starting another crew as a small link. Pure: no database.
 */
import type { CrewMembership } from '../auth/types';
import { canManageCrew } from '../auth/permissions';
import { buildCrewPageView, type CrewPageView } from './crew-page-view';
import { ROLE_LABELS, type CrewMember, type PendingInvitation } from './crews';

export interface CrewHomeInput {
  userId: string;
  /** The session's crew, or null for a user who belongs to none. */
  current: CrewMembership | null;
  /** Every crew of the user, the current one included. */
  crews: readonly CrewMembership[];
  members: readonly CrewMember[];
  /** Open invitations; loaded for a lead only. */
  invitations: readonly PendingInvitation[];
  timeZone?: string | null;
  /** The "start another crew" form was posted with an error, so it shows unfolded. */
  creating: boolean;
}

export interface CrewHomeView {
  current: {
    crewId: string;
    name: string;
    roleWord: string;
    roleHint: string;
    members: Pick<CrewPageView['members'][number], 'userId' | 'label' | 'email' | 'roleLabel'>[];
    invitations: CrewPageView['invitations'];
    /** Only the viewer is in the crew and nobody is invited: the page says what a crew is for. */
    alone: boolean;
    /** For a lead: the invitation flow on the crew's page. Null for anyone else. */
    inviteHref: string | null;
    /** The crew's page, where a lead changes roles and alert limits. */
    crewHref: string;
  } | null;
  others: { crewId: string; name: string; roleLabel: string; href: string }[];
  /** Start another crew unfolded: on an error, or when the user has no crew at all. */
  createOpen: boolean;
}

/** The model of `/crews`. */
export function buildCrewHomeView(input: CrewHomeInput): CrewHomeView {
  const c = input.current;
  const lead = canManageCrew(c);
  const page = c
    ? buildCrewPageView({
        userId: input.userId,
        role: c.role,
        lead,
        members: input.members,
        invitations: lead ? input.invitations : [],
        audit: [],
        timeZone: input.timeZone,
      })
    : null;
  return {
    current:
      c && page
        ? {
            crewId: c.crewId,
            name: c.crewName,
            roleWord: page.roleWord,
            roleHint: page.roleHint,
            members: page.members.map(({ userId, label, email, roleLabel }) => ({ userId, label, email, roleLabel })),
            invitations: page.invitations,
            alone: page.members.every((m) => m.userId === input.userId) && page.invitations.length === 0,
            inviteHref: lead ? `/crews/${c.crewId}#invite-h` : null,
            crewHref: `/crews/${c.crewId}`,
          }
        : null,
    others: input.crews
      .filter((x) => x.crewId !== c?.crewId)
      .map((x) => ({ crewId: x.crewId, name: x.crewName, roleLabel: ROLE_LABELS[x.role], href: `/crews/${x.crewId}` })),
    createOpen: input.creating || c === null,
  };
}
