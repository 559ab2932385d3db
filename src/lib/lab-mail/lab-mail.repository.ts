/** Every query of lab reports by e-mail. Each function takes `db` or a transaction first. */
import { sql, type Kysely, type Transaction } from 'kysely';
import type { Database, InboundMailStatus } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

/** The NOTIFY channel a stored inbound message wakes the worker on. */
export const INBOUND_MAIL_CHANNEL = 'sumpwise_inbound_mail';

export function findImportAddress(db: Db, crewId: string) {
  return db.selectFrom('import_addresses').selectAll().where('crew_id', '=', crewId).executeTakeFirst();
}

/** Insert the crew's first token; an existing one is kept (two first views at once agree). */
export async function insertImportAddress(db: Db, crewId: string, token: string): Promise<void> {
  await db
    .insertInto('import_addresses')
    .values({ crew_id: crewId, token })
    .onConflict((oc) => oc.column('crew_id').doNothing())
    .execute();
}

export async function replaceImportToken(db: Db, crewId: string, token: string, userId: string): Promise<void> {
  await db
    .updateTable('import_addresses')
    .set({ token, rotated_at: sql`now()`, rotated_by: userId })
    .where('crew_id', '=', crewId)
    .execute();
}

export function findCrewByToken(db: Db, token: string) {
  return db
    .selectFrom('import_addresses')
    .innerJoin('crews', 'crews.id', 'import_addresses.crew_id')
    .select(['import_addresses.crew_id', 'crews.name as crew_name'])
    .where('import_addresses.token', '=', token)
    .executeTakeFirst();
}

export async function listSenders(db: Db, crewId: string): Promise<string[]> {
  const rows = await db
    .selectFrom('import_address_senders')
    .select('address')
    .where('crew_id', '=', crewId)
    .orderBy('address')
    .execute();
  return rows.map((r) => r.address);
}

export async function insertSender(db: Db, crewId: string, address: string, userId: string): Promise<boolean> {
  const row = await db
    .insertInto('import_address_senders')
    .values({ crew_id: crewId, address, added_by: userId })
    .onConflict((oc) => oc.columns(['crew_id', 'address']).doNothing())
    .returning('address')
    .executeTakeFirst();
  return row !== undefined;
}

export async function deleteSender(db: Db, crewId: string, address: string): Promise<boolean> {
  const result = await db
    .deleteFrom('import_address_senders')
    .where('crew_id', '=', crewId)
    .where('address', '=', address)
    .executeTakeFirst();
  return Number(result.numDeletedRows) > 0;
}

/** Store an inbound message; the same bytes for the same crew again insert nothing and return null. */
export async function insertInboundMail(
  db: Db,
  row: {
    via: 'smtp' | 'webhook';
    envelopeFrom: string | null;
    recipient: string;
    crewId: string | null;
    raw: Buffer | null;
    rawSha256: string | null;
    byteSize: number;
    status: InboundMailStatus;
    reason: string | null;
  },
): Promise<{ id: string } | null> {
  const inserted = await db
    .insertInto('inbound_mails')
    .values({
      via: row.via,
      envelope_from: row.envelopeFrom?.slice(0, 320) ?? null,
      recipient: row.recipient.slice(0, 320),
      crew_id: row.crewId,
      raw: row.raw,
      raw_sha256: row.rawSha256,
      byte_size: row.byteSize,
      status: row.status,
      reason: row.reason,
    })
    .onConflict((oc) => oc.columns(['crew_id', 'raw_sha256']).doNothing())
    .returning('id')
    .executeTakeFirst();
  return inserted ?? null;
}

export async function notifyInboundMail(db: Db): Promise<void> {
  await sql`select pg_notify(${INBOUND_MAIL_CHANNEL}, '')`.execute(db);
}

/** Lock the oldest message waiting to be processed; one held by another worker is skipped. */
export function lockNextReceivedMail(trx: Transaction<Database>) {
  return trx
    .selectFrom('inbound_mails')
    .select(['id', 'crew_id', 'raw', 'envelope_from', 'recipient'])
    .where('status', '=', 'received')
    .orderBy('received_at')
    .limit(1)
    .forUpdate()
    .skipLocked()
    .executeTakeFirst();
}

export async function finishInboundMail(
  db: Db,
  id: string,
  row: {
    status: InboundMailStatus;
    reason: string | null;
    fromAddress: string | null;
    subject: string | null;
    labFileIds: string[];
  },
): Promise<void> {
  await db
    .updateTable('inbound_mails')
    .set({
      status: row.status,
      reason: row.reason?.slice(0, 4000) ?? null,
      from_address: row.fromAddress?.slice(0, 320) ?? null,
      subject: row.subject?.slice(0, 300) ?? null,
      lab_file_ids: JSON.stringify(row.labFileIds),
      processed_at: sql`now()`,
    })
    .where('id', '=', id)
    .execute();
}

/** The crew's latest inbound messages, newest first, without their bytes. */
export function listInboundMailsOfCrew(db: Db, crewId: string, limit = 20) {
  return db
    .selectFrom('inbound_mails')
    .select([
      'id',
      'received_at',
      'status',
      'reason',
      'from_address',
      'envelope_from',
      'subject',
      'lab_file_ids',
      'byte_size',
    ])
    .where('crew_id', '=', crewId)
    .orderBy('received_at', 'desc')
    .limit(limit)
    .execute();
}
