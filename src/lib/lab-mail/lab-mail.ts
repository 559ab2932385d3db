/**
 * Lab reports by e-mail: the import address, the sender allow-list, and which attachments of a message are
 * lab files. Pure: no database, no I/O.
 */
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import { z } from 'zod';

/** Largest inbound message accepted: 25 MiB, the common ceiling of mail providers (common practice, no published source). */
export const MAX_INBOUND_MAIL_BYTES = 25 * 1024 * 1024;

/** The local part of every import address starts with this, so the relay tells them from other mail. */
export const IMPORT_LOCAL_PREFIX = 'lab-';

const BASE32 = 'abcdefghijklmnopqrstuvwxyz234567';

/** A fresh token: 130 random bits as 26 lower-case base-32 characters (unguessable, case-proof in mail). */
export function generateImportToken(): string {
  const bytes = randomBytes(17);
  let out = '';
  for (let i = 0; i < 26; i += 1) {
    const bit = i * 5;
    const byte = bit >> 3;
    const word = ((bytes[byte] ?? 0) << 8) | (bytes[byte + 1] ?? 0);
    out += BASE32[(word >> (11 - (bit & 7))) & 31];
  }
  return out;
}

/** The import address of a token on the inbound domain. */
export function formatImportAddress(token: string, domain: string): string {
  return `${IMPORT_LOCAL_PREFIX}${token}@${domain}`;
}

/**
 * The token of an import address, or null when the address is not one: local part "lab-<token>" (an optional
 * "+tag" after it is ignored, as mail systems do), on the inbound domain, compared without regard to case.
 */
export function parseImportAddress(address: string, domain: string): string | null {
  if (address.length > 320) return null;
  const at = address.lastIndexOf('@');
  if (at === -1) return null;
  const local = address.slice(0, at).toLowerCase();
  if (address.slice(at + 1).toLowerCase() !== domain.toLowerCase()) return null;
  if (!local.startsWith(IMPORT_LOCAL_PREFIX)) return null;
  const token = local.slice(IMPORT_LOCAL_PREFIX.length).split('+')[0] ?? '';
  return /^[a-z0-9]{16,64}$/.test(token) ? token : null;
}

/** True when the address is addressed to the import domain at all (even with an unknown token). */
export function isImportDomain(address: string, domain: string): boolean {
  const at = address.lastIndexOf('@');
  return at !== -1 && address.slice(at + 1).toLowerCase() === domain.toLowerCase();
}

/** A sender address as the allow-list keeps it: trimmed, lower case. */
export function normaliseSender(address: string): string {
  return address.trim().toLowerCase();
}

export const senderInputSchema = z
  .string()
  .trim()
  .max(254, 'Keep the address under 254 characters')
  .pipe(z.email('Write a whole address, such as results@lab.example'))
  .transform(normaliseSender);

/** The form of the import address card: one action, and the sender for add/remove. */
export const importAddressFormSchema = z.discriminatedUnion('action', [
  z.object({ action: z.literal('rotate') }).strict(),
  z.object({ action: z.literal('add-sender'), sender: senderInputSchema }).strict(),
  z.object({ action: z.literal('remove-sender'), sender: senderInputSchema }).strict(),
]);
export type ImportAddressForm = z.infer<typeof importAddressFormSchema>;

/** True when the sender may send lab files: an empty list accepts anyone who knows the address. */
export function isSenderAllowed(allowList: readonly string[], sender: string | null): boolean {
  if (allowList.length === 0) return true;
  return sender !== null && allowList.includes(normaliseSender(sender));
}

/** Attachment types that are lab files: by name, or by declared type when the name says nothing. */
const LAB_EXTENSIONS = /\.(csv|tsv|txt|xlsx)$/i;
const LAB_TYPES = new Set([
  'text/csv',
  'text/tab-separated-values',
  'text/plain',
  'application/csv',
  'application/vnd.ms-excel',
  'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
]);

export interface AttachmentLike {
  filename?: string | undefined;
  contentType: string;
  size: number;
}

/** True when an attachment should be read as a lab file (the content is still checked like an upload). */
export function isLabAttachment(a: AttachmentLike): boolean {
  if (a.filename && /\.[a-z0-9]{1,5}$/i.test(a.filename)) return LAB_EXTENSIONS.test(a.filename);
  return LAB_TYPES.has(a.contentType.toLowerCase());
}

/** The name a mailed attachment is stored under: its own, or one made from its type. */
export function nameAttachment(a: AttachmentLike, index: number): string {
  if (a.filename && a.filename.trim() !== '') return a.filename;
  const ext = a.contentType.includes('spreadsheetml')
    ? 'xlsx'
    : a.contentType.includes('tab-separated')
      ? 'tsv'
      : a.contentType === 'text/plain'
        ? 'txt'
        : 'csv';
  return `lab-report-${index + 1}.${ext}`;
}

/** The sentences of a message set aside or refused, shown on the lab import page and kept in the log. */
export const INBOUND_REASONS = {
  unknownAddress: (recipient: string) =>
    `No crew has the import address ${recipient} (it may have been replaced); the message was refused.`,
  tooLarge: (bytes: number) =>
    `The message is ${(bytes / (1024 * 1024)).toFixed(1)} MiB; messages up to ${MAX_INBOUND_MAIL_BYTES / (1024 * 1024)} MiB are accepted, so it was refused.`,
  senderNotAllowed: (sender: string | null) =>
    `Sent from ${sender ?? 'an address that could not be read'}, which is not on the crew's list of lab addresses, so it was kept aside and nothing was imported. Add the address on the lab import page if the lab really sends from it.`,
  malformed: (why: string) =>
    `The message could not be read as e-mail (${why}), so it was kept aside and nothing was imported.`,
  noAttachment: (others: readonly string[]) =>
    `The message has no CSV, TSV, text or .xlsx attachment${others.length > 0 ? ` (only ${others.slice(0, 5).join(', ')})` : ''}, so there was nothing to import; it was kept aside.`,
  allRefused: (problems: readonly string[]) => `No attachment could be kept as a lab file: ${problems.join(' ')}`,
} as const;

/** Quick checks that a message is MIME at all before the parser sees it: a header block with From or Date. */
export function findMimeProblem(raw: Buffer): string | null {
  if (raw.length === 0) return 'it is empty';
  const head = raw.subarray(0, Math.min(raw.length, 64 * 1024)).toString('latin1');
  const split = head.search(/\r?\n\r?\n/);
  if (split === -1) return 'it has no header block followed by a blank line';
  const headers = head.slice(0, split);
  const lines = headers.split(/\r?\n/);
  if (!lines.every((l) => /^[\x21-\x39\x3b-\x7e]+:/.test(l) || /^[ \t]/.test(l)))
    return 'a header line is not "Name: value"';
  if (!/^(from|date|message-id):/im.test(headers)) return 'it has no From, Date or Message-ID header';
  const type = /^content-type:[ \t]*multipart\/[^\r\n]*(?:\r?\n[ \t][^\r\n]*)*/im.exec(headers)?.[0];
  if (type && !/boundary=/i.test(type)) return 'it says it has several parts but names no boundary between them';
  return null;
}

/** Headers of the inbound webhook (the production hand-off from an inbound mail provider). */
export const WEBHOOK_HEADERS = {
  timestamp: 'x-sumpwise-timestamp',
  recipient: 'x-sumpwise-recipient',
  envelopeFrom: 'x-sumpwise-envelope-from',
  signature: 'x-sumpwise-signature',
} as const;

/** How far a webhook's timestamp may be from our clock: 5 minutes (common practice for signed webhooks). */
export const WEBHOOK_TOLERANCE_SECONDS = 300;

/** The signature of a webhook request: "sha256=" + hex HMAC-SHA256 over "<timestamp>\n<recipient>\n<raw message>". */
export function signInboundWebhook(secret: string, timestamp: string, recipient: string, body: Uint8Array): string {
  const mac = createHmac('sha256', secret);
  mac.update(`${timestamp}\n${recipient}\n`);
  mac.update(body);
  return `sha256=${mac.digest('hex')}`;
}

/** Why a webhook request is not authentic, or null when it is (constant-time comparison, fresh timestamp). */
export function checkInboundWebhook(
  secret: string,
  headers: { timestamp: string | null; recipient: string | null; signature: string | null },
  body: Uint8Array,
  nowSeconds: number,
): string | null {
  const { timestamp, recipient, signature } = headers;
  if (!timestamp || !recipient || !signature) return 'the timestamp, recipient and signature headers are required';
  if (!/^\d{1,12}$/.test(timestamp) || Math.abs(nowSeconds - Number(timestamp)) > WEBHOOK_TOLERANCE_SECONDS)
    return 'the timestamp is missing or more than 5 minutes off';
  const expected = Buffer.from(signInboundWebhook(secret, timestamp, recipient, body));
  const given = Buffer.from(signature.slice(0, 200));
  return expected.length === given.length && timingSafeEqual(expected, given) ? null : 'the signature does not match';
}
