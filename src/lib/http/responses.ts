import type { ServiceFailure } from '../auth/result';
import { jsonError } from './json';

/** A service refusal as a JSON error in the shared shape (with Retry-After when rate limited). */
export function jsonFailure(f: ServiceFailure): Response {
  const headers: Record<string, string> = f.retryAfterSeconds ? { 'retry-after': String(f.retryAfterSeconds) } : {};
  return jsonError(f.status, f.code, f.message, f.fields ?? {}, headers);
}
