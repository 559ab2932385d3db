/// <reference types="astro/client" />

declare namespace App {
  interface Locals {
    /** The signed-in user, or null. Set by src/middleware.ts. */
    user: import('./lib/auth/types').SessionUser | null;
    /** The Lucia session behind `user`, or null. */
    session: import('./lib/auth/types').SessionInfo | null;
    /** The crew the user is working in (from the session), with their role there; null when signed out. */
    crew: import('./lib/auth/types').CrewMembership | null;
    /** Every crew the user belongs to, for the crew switcher. */
    crews: import('./lib/auth/types').CrewMembership[];
    /** A per-request id for logs and CSP nonces. */
    requestId: string;
  }
}
