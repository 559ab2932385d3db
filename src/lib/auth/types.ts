/** The roles a crew member can have, most responsible first. */
export const ROLES = ['lead', 'mechanic', 'rider'] as const;
/** A member's role in a crew. */
export type Role = (typeof ROLES)[number];

/** What every page knows of the signed-in user. */
export interface SessionUser {
  id: string;
  email: string;
  displayName: string;
  emailVerified: boolean;
  distanceUnit: 'mi' | 'km';
  lengthUnit: 'in' | 'mm';
  temperatureUnit: 'F' | 'C';
  /** IANA zone name times are shown in; null (or absent) until set, and screens then show UTC. */
  timeZone?: string | null;
}

export interface SessionInfo {
  id: string;
  expiresAt: Date;
  fresh: boolean;
}

/** A user's place in one crew. */
export interface CrewMembership {
  crewId: string;
  crewName: string;
  role: Role;
}

/**
 * Who is acting: the signed-in user and their membership of the crew in question. Most services act inside
 * the session's crew (`Actor`); those that answer a non-member themselves take `Actor<CrewMembership | null>`.
 */
export interface Actor<Membership extends CrewMembership | null = CrewMembership> {
  userId: string;
  /** Shown to others where the action names who did it (an invitation's sender). */
  displayName?: string;
  membership: Membership;
}
