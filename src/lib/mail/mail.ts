import { createHash } from 'node:crypto';
import { z } from 'zod';

// Header names the sender sets itself; a caller overriding them could forge or break a message.
const RESERVED_HEADERS = new Set([
  'from',
  'to',
  'cc',
  'bcc',
  'subject',
  'message-id',
  'date',
  'sender',
  'reply-to',
  'return-path',
  'content-type',
  'content-transfer-encoding',
  'mime-version',
]);

// No CR or LF anywhere a header value goes: that is how header injection works.
const singleLine = z.string().refine((v) => !/[\r\n]/.test(v), 'must be a single line');

/** One logical message a feature wants sent; validated before it reaches the outbox. */
export const queuedMailSchema = z.object({
  to: z.email().max(254),
  subject: singleLine.pipe(z.string().min(1).max(200)),
  text: z.string().min(1),
  html: z.string().min(1),
  // The same key always means the same message: queueing it again is a no-op, and the Message-ID derives from it.
  idempotencyKey: z.string().min(1).max(200),
  // What sort of message this is (verify_email, crew_invitation, sample_reminder…), for the record and the mailbox.
  kind: z.string().regex(/^[a-z][a-z0-9_.-]{0,63}$/, 'lower-case word, e.g. verify_email'),
  headers: z
    .record(
      z
        .string()
        .regex(/^[A-Za-z][A-Za-z0-9-]{0,63}$/, 'header name')
        .refine((n) => !RESERVED_HEADERS.has(n.toLowerCase()), 'reserved header'),
      singleLine.pipe(z.string().max(998)),
    )
    .optional(),
});

export type QueuedMail = z.input<typeof queuedMailSchema>;

/** What one flush of the outbox did. */
export interface DeliveryReport {
  sent: number;
  /** Attempts that failed and will be retried later. */
  deferred: number;
  /** Messages given up on (permanent refusal or attempts exhausted). */
  failed: number;
}

/** Retry timing for undeliverable messages: exponential from baseMs, capped at maxMs. */
export interface BackoffPolicy {
  baseMs: number;
  maxMs: number;
  /** After this many failed attempts the message is marked failed instead of retried. */
  maxAttempts: number;
}

// 30 s, 1 min, 2 min … capped at 30 min; 60 attempts is over a day of relay outage before we give up.
// Common practice for outbound mail queues, no published source.
export const DEFAULT_BACKOFF: BackoffPolicy = { baseMs: 30_000, maxMs: 30 * 60_000, maxAttempts: 60 };

/** The delay before attempt number `attempts + 1`, given `attempts` failures so far (attempts >= 1). */
export function computeRetryDelayMs(attempts: number, policy: BackoffPolicy): number {
  const exponent = Math.max(0, attempts - 1);
  return Math.min(policy.maxMs, policy.baseMs * 2 ** Math.min(exponent, 30));
}

/** A stable Message-ID for a logical message: the same idempotency key always gives the same id. */
export function deriveMessageId(idempotencyKey: string, fromAddress: string): string {
  const domain = /@([A-Za-z0-9.-]+)>?\s*$/.exec(fromAddress)?.[1] ?? 'sumpwise.invalid';
  const digest = createHash('sha256').update(idempotencyKey).digest('hex').slice(0, 40);
  return `<${digest}.mail@${domain.toLowerCase()}>`;
}
