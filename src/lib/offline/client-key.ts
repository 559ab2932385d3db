import { z } from 'zod';

/**
 * The key a device gives a write it may send more than once (from its offline queue, or a retry after a
 * lost reply). The server stores it with the record; a resend with a known key answers the first record.
 * Random UUIDs in practice; any 8 to 64 URL-safe characters are accepted.
 */
export const clientKeySchema = z.preprocess(
  (v) => (v === '' ? undefined : v),
  z
    .string()
    .regex(/^[A-Za-z0-9_-]{8,64}$/, 'Not a valid card key.')
    .optional(),
);
