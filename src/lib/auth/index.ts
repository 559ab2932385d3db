// The accounts module's public face for pages and endpoints.
export * from './permissions';
export type { Actor, SessionUser, SessionInfo, CrewMembership } from './types';
export { requireUser, requireCrew, requireApiUser, requireApiCrew, signInRedirect } from './guards';
export { getAuthDeps, applySessionCookie, clientIp } from './deps';
