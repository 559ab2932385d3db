/** A refused request as services report it; routes turn it into a JSON error or an inline form error. */
export interface ServiceFailure {
  ok: false;
  /** HTTP status a JSON endpoint answers with. */
  status: number;
  code: string;
  message: string;
  fields?: Record<string, string>;
  retryAfterSeconds?: number;
}

export type ServiceResult<T extends object = object> = ({ ok: true } & T) | ServiceFailure;

/** Builds a failure. */
export function fail(status: number, code: string, message: string, extra: Pick<ServiceFailure, 'fields' | 'retryAfterSeconds'> = {}): ServiceFailure {
  return { ok: false, status, code, message, ...extra };
}

/** The standard 404 for a record of another crew (or none): it never says which. */
export const NOT_FOUND = (): ServiceFailure => fail(404, 'not_found', 'There is nothing here, or it belongs to a crew you are not in.');
export const FORBIDDEN = (message = 'Your role in this crew does not allow that.'): ServiceFailure => fail(403, 'forbidden', message);
