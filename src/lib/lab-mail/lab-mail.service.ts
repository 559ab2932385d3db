/*
 * Lab reports by e-mail
 * =====================
 *
 * 1. Receipt (the relay's SMTP session, or the authenticated webhook). The recipient must be a crew's import
 *    address; an unknown one is refused (550) and only the refusal is logged. A message over 25 MiB is
 *    refused (552) with a logged reason. Otherwise the raw bytes are stored in `inbound_mails` with status
 *    "received" and a NOTIFY, in one statement, before the sender is told "accepted": from then on the
 *    message is ours and cannot be lost. The same bytes for the same crew again store nothing.
 *
 * 2. Processing (the job worker, pg-boss queue `lab-mail.process`, woken by the NOTIFY, a tick and its own
 *    start). Each message is taken with `for update skip locked` and handled in one transaction: parse the
 *    MIME (mailparser), check the sender against the crew's allow-list, keep every CSV/TSV/text/.xlsx
 *    attachment through the same `storeLabFile` as an upload (size, type, SHA-256 idempotency; nothing is
 *    written to samples), queue the notice to mechanics and leads by their preferences, and mark the message
 *    processed or set aside with its reason. A worker killed anywhere in that transaction leaves the message
 *    "received": the next worker processes it once.
 */
import { createHash } from 'node:crypto';
import type { Kysely, Transaction } from 'kysely';
import { simpleParser, type ParsedMail } from 'mailparser';
import { deliverAlerts, loadAlertEnv, type AlertForRecipient } from '../alerts/alerts.service';
import type { AlertEnv } from '../alerts/alerts';
import { findCrewName, listCrewRecipients } from '../alerts/alerts.repository';
import { recordAuditEvent } from '../audit/audit.repository';
import type { Database } from '../db/database';
import { refuse, succeed, type Result } from '../http/result';
import { storeLabFile } from '../lab-import/lab-import.service';
import { composeLabReportArrived } from './lab-mail-notice';
import {
  findMimeProblem,
  formatImportAddress,
  generateImportToken,
  INBOUND_REASONS,
  isLabAttachment,
  isSenderAllowed,
  MAX_INBOUND_MAIL_BYTES,
  nameAttachment,
  parseImportAddress,
} from './lab-mail';
import * as repo from './lab-mail.repository';

type Db = Kysely<Database> | Transaction<Database>;

export interface ImportAddressView {
  address: string;
  rotatedAt: Date | null;
  senders: string[];
}

/** The crew's import address (made on first use) and its allow-list. */
export async function getImportAddress(db: Db, crewId: string, domain: string): Promise<ImportAddressView> {
  let row = await repo.findImportAddress(db, crewId);
  if (!row) {
    await repo.insertImportAddress(db, crewId, generateImportToken());
    row = await repo.findImportAddress(db, crewId);
  }
  if (!row) throw new Error('import address could not be created');
  return {
    address: formatImportAddress(row.token, domain),
    rotatedAt: row.rotated_at,
    senders: await repo.listSenders(db, crewId),
  };
}

/** A change to the import address answers with a sentence for the lead. */
export type ImportAddressChange = Result<{ message: string }>;

/** Replace the crew's token (the old address stops working at once), in the audit log. */
export async function rotateImportAddress(
  db: Kysely<Database>,
  input: { crewId: string; userId: string; ip: string | null; domain: string },
): Promise<ImportAddressChange> {
  return db.transaction().execute(async (trx) => {
    await getImportAddress(trx, input.crewId, input.domain);
    await repo.replaceImportToken(trx, input.crewId, generateImportToken(), input.userId);
    await recordAuditEvent(trx, {
      kind: 'import_address_rotated',
      crewId: input.crewId,
      actorUserId: input.userId,
      ip: input.ip,
    });
    return succeed({
      message: 'The import address was replaced. Give the new one to your labs; mail to the old one is now refused.',
    });
  });
}

/** Add or remove a lab address of the allow-list, in the audit log. */
export async function changeSender(
  db: Kysely<Database>,
  input: { crewId: string; userId: string; ip: string | null; sender: string; add: boolean },
): Promise<ImportAddressChange> {
  return db.transaction().execute(async (trx) => {
    const changed = input.add
      ? await repo.insertSender(trx, input.crewId, input.sender, input.userId)
      : await repo.deleteSender(trx, input.crewId, input.sender);
    if (!changed) {
      return input.add
        ? refuse(409, 'invalid_input', `${input.sender} is already on the list.`, { sender: 'already on the list' })
        : refuse(400, 'invalid_input', `${input.sender} is not on the list.`, { sender: 'not on the list' });
    }
    await recordAuditEvent(trx, {
      kind: input.add ? 'import_sender_added' : 'import_sender_removed',
      crewId: input.crewId,
      actorUserId: input.userId,
      ip: input.ip,
      detail: { sender: input.sender },
    });
    return succeed({
      message: input.add ? `Mail from ${input.sender} is now imported.` : `${input.sender} was removed from the list.`,
    });
  });
}

export type ReceiveOutcome =
  | { status: 'received'; id: string }
  | { status: 'duplicate' }
  | { status: 'refused'; smtpCode: 550 | 552; reason: string };

/** Step 1 of the top of this file: store a message for an import address, or refuse it with a logged reason. */
export async function receiveInboundMail(
  db: Db,
  input: {
    via: 'smtp' | 'webhook';
    envelopeFrom: string | null;
    recipient: string;
    raw: Buffer;
    domain: string;
    byteSize?: number;
    log?: (line: string) => void;
  },
): Promise<ReceiveOutcome> {
  // The relay stops keeping bytes past the limit; it passes the size it counted.
  const size = input.byteSize ?? input.raw.byteLength;
  const token = parseImportAddress(input.recipient, input.domain);
  const crew = token ? await repo.findCrewByToken(db, token) : undefined;
  const base = { via: input.via, envelopeFrom: input.envelopeFrom, recipient: input.recipient, byteSize: size };
  if (!crew) {
    const reason = INBOUND_REASONS.unknownAddress(input.recipient);
    await repo.insertInboundMail(db, { ...base, crewId: null, raw: null, rawSha256: null, status: 'refused', reason });
    input.log?.(`[lab-mail] refused: ${reason}`);
    return { status: 'refused', smtpCode: 550, reason };
  }
  if (size > MAX_INBOUND_MAIL_BYTES) {
    const reason = INBOUND_REASONS.tooLarge(size);
    await repo.insertInboundMail(db, {
      ...base,
      crewId: crew.crew_id,
      raw: null,
      rawSha256: null,
      status: 'refused',
      reason,
    });
    input.log?.(`[lab-mail] refused for crew ${crew.crew_id}: ${reason}`);
    return { status: 'refused', smtpCode: 552, reason };
  }
  const sha = createHash('sha256').update(input.raw).digest('hex');
  const stored = await repo.insertInboundMail(db, {
    ...base,
    crewId: crew.crew_id,
    raw: input.raw,
    rawSha256: sha,
    status: 'received',
    reason: null,
  });
  if (!stored) return { status: 'duplicate' };
  await repo.notifyInboundMail(db);
  return { status: 'received', id: stored.id };
}

/** Hooks for fault tests: run inside a message's transaction after its files are stored; a throw or a kill rolls it back. */
export interface ProcessHooks {
  afterStore?: (trx: Transaction<Database>) => Promise<void> | void;
}

export interface ProcessReport {
  processed: number;
  setAside: number;
  filesStored: number;
}

/** Step 2 of the top of this file: process every waiting message, one transaction each. */
export async function processInboundMails(
  db: Kysely<Database>,
  options: { env?: AlertEnv; hooks?: ProcessHooks; limit?: number; log?: (line: string) => void } = {},
): Promise<ProcessReport> {
  const report: ProcessReport = { processed: 0, setAside: 0, filesStored: 0 };
  const env = options.env ?? loadAlertEnv();
  for (let i = 0; i < (options.limit ?? 50); i += 1) {
    const outcome = await db.transaction().execute(async (trx) => {
      const row = await repo.lockNextReceivedMail(trx);
      if (!row) return null;
      return processOne(trx, row, env, options.hooks ?? {});
    });
    if (outcome === null) break;
    if (outcome.status === 'processed') report.processed += 1;
    else report.setAside += 1;
    report.filesStored += outcome.stored;
    options.log?.(
      `[lab-mail] ${outcome.status === 'processed' ? 'processed' : 'set aside'}: ${outcome.reason ?? `${outcome.stored} lab file(s) waiting for a confirm`}`,
    );
  }
  return report;
}

interface ProcessOutcome {
  status: 'processed' | 'set_aside';
  reason: string | null;
  stored: number;
}

type LockedMail = NonNullable<Awaited<ReturnType<typeof repo.lockNextReceivedMail>>>;

async function processOne(
  trx: Transaction<Database>,
  row: LockedMail,
  env: AlertEnv,
  hooks: ProcessHooks,
): Promise<ProcessOutcome> {
  const finish = async (
    status: ProcessOutcome['status'],
    reason: string | null,
    extra: { from?: string | null; subject?: string | null; ids?: string[]; stored?: number } = {},
  ) => {
    await repo.finishInboundMail(trx, row.id, {
      status,
      reason,
      fromAddress: extra.from ?? null,
      subject: extra.subject ?? null,
      labFileIds: extra.ids ?? [],
    });
    return { status, reason, stored: extra.stored ?? 0 };
  };
  if (!row.crew_id || !row.raw) return finish('set_aside', INBOUND_REASONS.malformed('nothing was stored'));
  const raw = row.raw;
  const problem = findMimeProblem(raw);
  if (problem) return finish('set_aside', INBOUND_REASONS.malformed(problem));
  let parsed: ParsedMail;
  try {
    parsed = await simpleParser(raw, {
      skipHtmlToText: true,
      skipTextToHtml: true,
      skipTextLinks: true,
      skipImageLinks: true,
    });
  } catch (error) {
    return finish(
      'set_aside',
      INBOUND_REASONS.malformed(error instanceof Error ? error.message.slice(0, 200) : 'unreadable'),
    );
  }
  const from = parsed.from?.value[0]?.address ?? null;
  const subject = parsed.subject ?? null;
  const senders = await repo.listSenders(trx, row.crew_id);
  if (!isSenderAllowed(senders, from))
    return finish('set_aside', INBOUND_REASONS.senderNotAllowed(from), { from, subject });

  const labAttachments = parsed.attachments.filter((a) => isLabAttachment(a));
  if (labAttachments.length === 0) {
    const others = parsed.attachments.map((a, i) => `"${nameAttachment(a, i)}"`);
    return finish('set_aside', INBOUND_REASONS.noAttachment(others), { from, subject });
  }
  const ids: string[] = [];
  const fresh: { id: string; fileName: string }[] = [];
  const problems: string[] = [];
  for (const [index, attachment] of labAttachments.entries()) {
    const fileName = nameAttachment(attachment, index);
    const stored = await storeLabFile(trx, {
      crewId: row.crew_id,
      userId: null,
      fileName,
      bytes: new Uint8Array(attachment.content.buffer, attachment.content.byteOffset, attachment.content.byteLength),
      inboundMailId: row.id,
    });
    if (stored.ok) {
      // The same attachment twice in one message is one lab file.
      if (!ids.includes(stored.value.labFileId)) ids.push(stored.value.labFileId);
      if (stored.value.status === 'stored') fresh.push({ id: stored.value.labFileId, fileName });
    } else {
      problems.push(stored.message);
    }
  }
  await hooks.afterStore?.(trx);
  if (ids.length === 0) return finish('set_aside', INBOUND_REASONS.allRefused(problems), { from, subject });
  if (fresh.length > 0) await noticeMechanics(trx, env, row.crew_id, row.id, fresh, from);
  const note =
    problems.length > 0
      ? `Not every attachment was kept: ${problems.join(' ')}`
      : fresh.length === 0
        ? 'The same files were received before; nothing new was stored.'
        : null;
  return finish('processed', note, { from, subject, ids, stored: fresh.length });
}

/** One notice per mechanic and lead, by their preferences, with a link to each waiting preview. */
async function noticeMechanics(
  trx: Transaction<Database>,
  env: AlertEnv,
  crewId: string,
  inboundId: string,
  files: readonly { id: string; fileName: string }[],
  from: string | null,
): Promise<void> {
  const crewName = (await findCrewName(trx, crewId)) ?? 'your crew';
  const recipients = await listCrewRecipients(trx, crewId, ['mechanic', 'lead']);
  const content = composeLabReportArrived({
    crewName,
    sender: from,
    files: files.map((f) => ({ fileName: f.fileName, url: `${env.publicUrl}/imports/${f.id}` })),
  });
  const alerts: AlertForRecipient[] = recipients.map((recipient) => ({
    recipient,
    dedupeKey: `lab-mail:${inboundId}:${recipient.user_id}`,
    content,
  }));
  await deliverAlerts(trx, env, { crewId, crewName, kind: 'lab_report_arrived', alerts });
}

/** The crew's latest inbound messages for the lab import page. */
export async function listInboundMails(db: Db, crewId: string) {
  const rows = await repo.listInboundMailsOfCrew(db, crewId);
  return rows.map((r) => ({
    id: r.id,
    receivedAt: r.received_at,
    status: r.status,
    reason: r.reason,
    from: r.from_address ?? r.envelope_from,
    subject: r.subject,
    labFileIds: Array.isArray(r.lab_file_ids) ? r.lab_file_ids : [],
  }));
}
