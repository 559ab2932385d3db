/** SQLSTATE of a unique violation (PostgreSQL manual, Appendix A "PostgreSQL Error Codes"). */
const UNIQUE_VIOLATION = '23505';

/**
 * True when `error` is PostgreSQL's unique violation on the named constraint or unique index, read from the
 * error's `code` and `constraint` fields (never from its message, whose wording is not an interface).
 */
export function uniqueViolation(error: unknown, constraint: string): boolean {
  if (typeof error !== 'object' || error === null) return false;
  const e = error as { code?: unknown; constraint?: unknown };
  return e.code === UNIQUE_VIOLATION && e.constraint === constraint;
}
