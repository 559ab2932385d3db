import type { AstroCookies } from 'astro';
import { getConfig, isSecureOrigin } from '../config';
import { readAppSecret } from '../alerts/secret';
import { KNOWN_DEVICE_COOKIE, KNOWN_DEVICE_MAX_AGE_SECONDS, isKnownDevice, markKnownDevice } from './known-device';
import { normaliseIp } from '../http/client-address';
import { createRateLimits, type RateLimits } from '../rate-limit/rate-limits';
import type { AuthDeps } from './auth.service';
import { getDb, getPool } from '../db';
import { getLucia, type SessionCookie } from './session';

let limits: RateLimits | undefined;

/** The account services' dependencies for routes (tests build their own on the test database). */
export function getAuthDeps(): AuthDeps {
  limits ??= createRateLimits(getPool());
  return { db: getDb(), lucia: getLucia(), limits, publicUrl: getConfig().PUBLIC_URL };
}

/** Whether this browser signed in to `email` before (it then skips the account-wide sign-in limit). */
export function isKnownDeviceFor(cookies: AstroCookies, email: string): boolean {
  return isKnownDevice(readAppSecret(getConfig().APP_SECRET), email, cookies.get(KNOWN_DEVICE_COOKIE)?.value);
}

/** Marks this browser as one the owner of `email` signs in from. */
export function rememberKnownDevice(cookies: AstroCookies, email: string): void {
  cookies.set(KNOWN_DEVICE_COOKIE, markKnownDevice(readAppSecret(getConfig().APP_SECRET), email), {
    httpOnly: true,
    sameSite: 'lax',
    path: '/',
    maxAge: KNOWN_DEVICE_MAX_AGE_SECONDS,
    secure: isSecureOrigin(getConfig()),
  });
}

/** Writes a Lucia cookie (a session, or the blank one that clears it) onto the response. */
export function applySessionCookie(cookies: AstroCookies, cookie: SessionCookie): void {
  cookies.set(cookie.name, cookie.value, cookie.attributes);
}

/**
 * The caller's address: the server wrapper (scripts/serve.ts) has already replaced any forwarded header with
 * the one address TRUST_PROXY allows, so this only checks it is an address at all (a forged, 10 KB value
 * never reaches a rate-limit key or the audit log).
 */
export function clientIp(context: { clientAddress: string }): string | null {
  try {
    return normaliseIp(context.clientAddress);
  } catch {
    return null;
  }
}
