import { createHash, randomBytes } from 'node:crypto';

/** A URL-safe random token of 32 bytes (256 bits) for e-mail links. */
export function generateToken(): string {
  return randomBytes(32).toString('base64url');
}

/** The SHA-256 hex digest stored in place of a token; a leaked table cannot be replayed as links. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

/** How long each kind of link stays valid. Common practice, no published source. */
export const TOKEN_LIFETIME_MS = {
  verify_email: 48 * 60 * 60 * 1000,
  reset_password: 60 * 60 * 1000,
  invitation: 7 * 24 * 60 * 60 * 1000,
} as const;
