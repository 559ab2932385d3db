import type { AstroCookies } from 'astro';
import type { Cookie } from 'lucia';
import { getConfig } from '../config';
import { getDb } from '../db';
import { createRateLimits, type RateLimits } from '../rate-limit/rate-limits';
import type { AuthDeps } from './auth.service';
import { getAuthPool, getLucia } from './lucia';

let limits: RateLimits | undefined;

/** The account services' dependencies for routes (tests build their own on the test database). */
export function getAuthDeps(): AuthDeps {
  limits ??= createRateLimits(getAuthPool());
  return { db: getDb(), lucia: getLucia(), limits, publicUrl: getConfig().PUBLIC_URL };
}

/** Writes a Lucia cookie (a session, or the blank one that clears it) onto the response. */
export function applySessionCookie(cookies: AstroCookies, cookie: Cookie): void {
  cookies.set(cookie.name, cookie.value, cookie.attributes);
}

/** The caller's address as the server saw it (no forwarded headers are trusted). */
export function clientIp(context: { clientAddress: string }): string | null {
  try {
    return context.clientAddress || null;
  } catch {
    return null;
  }
}
