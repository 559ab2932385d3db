import { jsonError } from './json';
import type { Refusal } from './result';

/** A service refusal as a JSON error in the shared { error: { code, message, fields } } shape (with Retry-After when rate limited). */
export function refusalJson(r: Refusal): Response {
  const headers: Record<string, string> = r.retryAfterSeconds ? { 'retry-after': String(r.retryAfterSeconds) } : {};
  return jsonError(r.status, r.code, r.message, r.fields, headers);
}
