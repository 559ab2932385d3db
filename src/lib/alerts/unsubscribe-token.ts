import { createHmac, timingSafeEqual } from 'node:crypto';
import type { NotificationKind } from '../db/database';

// Unsubscribe links work without signing in, so the link itself must prove which user, crew and kind it
// stops: the token is the payload and its HMAC-SHA256 (RFC 2104) under the app secret. It does not expire:
// an unsubscribe link in an old mail must still work (RFC 8058 §3 asks that it keep working for a while).

/** What an unsubscribe link stops: one kind from one crew, or (kind 'digest') the user's daily digest. */
export type UnsubscribeScope =
  { userId: string; crewId: string; kind: NotificationKind } | { userId: string; crewId: null; kind: 'digest' };

const VERSION = 'u1';
const KINDS = new Set<string>([
  'import_findings',
  'lab_report_arrived',
  'sample_due',
  'shipped_overdue',
  'invitation_pending',
  'digest',
]);

/** Signs a scope into a URL-safe token. */
export function signUnsubscribeToken(scope: UnsubscribeScope, secret: string): string {
  const payload = Buffer.from(JSON.stringify([VERSION, scope.userId, scope.crewId, scope.kind]), 'utf8').toString(
    'base64url',
  );
  return `${payload}.${sign(payload, secret)}`;
}

/** The scope of a token whose signature is valid, or null (forged, altered, truncated, other secret). */
export function verifyUnsubscribeToken(token: string, secret: string): UnsubscribeScope | null {
  if (token.length > 1000) return null;
  const dot = token.indexOf('.');
  if (dot <= 0 || dot !== token.lastIndexOf('.')) return null;
  const payload = token.slice(0, dot);
  const given = Buffer.from(token.slice(dot + 1), 'base64url');
  const expected = Buffer.from(sign(payload, secret), 'base64url');
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) return null;
  let parts: unknown;
  try {
    parts = JSON.parse(Buffer.from(payload, 'base64url').toString('utf8'));
  } catch {
    return null;
  }
  if (!Array.isArray(parts) || parts.length !== 4 || parts[0] !== VERSION) return null;
  const [, userId, crewId, kind] = parts as unknown[];
  if (typeof userId !== 'string' || userId === '' || typeof kind !== 'string' || !KINDS.has(kind)) return null;
  if (kind === 'digest') return crewId === null ? { userId, crewId: null, kind: 'digest' } : null;
  if (typeof crewId !== 'string' || crewId === '') return null;
  return { userId, crewId, kind: kind as NotificationKind };
}

function sign(payload: string, secret: string): string {
  return createHmac('sha256', secret).update(payload).digest('base64url');
}
