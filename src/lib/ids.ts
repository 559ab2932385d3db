const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** True for the canonical text form of a UUID; anything else cannot be a row id (and would make PostgreSQL throw), so it answers 404 without a query. */
export function isUuid(value: string): boolean {
  return UUID.test(value);
}
