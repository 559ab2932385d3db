import { createHmac, timingSafeEqual } from 'node:crypto';

// A browser that signed in to an account before carries a signed mark for that account, so the per-account
// sign-in limit (which an attacker on many addresses can fill) never holds the owner's own browser. This is
// the "device cookie" defence against online guessing (OWASP Authentication Cheat Sheet, account lock-out).

export const KNOWN_DEVICE_COOKIE = 'sumpwise_device';
/** How long a browser stays known after its last sign-in (common practice, no published source). */
export const KNOWN_DEVICE_MAX_AGE_SECONDS = 180 * 24 * 60 * 60;

function sign(secret: string, email: string): string {
  return createHmac('sha256', secret).update(`known-device\n${email.toLowerCase()}`).digest('base64url');
}

/** The cookie value that marks this browser as having signed in to `email`. */
export function markKnownDevice(secret: string, email: string): string {
  return sign(secret, email);
}

/** True when the cookie value is the mark for `email` (constant-time comparison). */
export function isKnownDevice(secret: string, email: string, cookieValue: string | undefined): boolean {
  if (!cookieValue || cookieValue.length > 100) return false;
  const expected = Buffer.from(sign(secret, email));
  const given = Buffer.from(cookieValue);
  return given.length === expected.length && timingSafeEqual(given, expected);
}
