/** Every query of the alerts: recipients, an import's findings, delivery records and digest items. */
import { sql, type Kysely, type Transaction } from 'kysely';
import type { AlertLine, Database, Level, NotificationKind, Role } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

export interface RecipientRow {
  user_id: string;
  email: string;
  display_name: string;
  role: Role;
  email_verified: boolean;
}

/** The crew's members of the given roles, plus the given users if they are members (any role). */
export async function listCrewRecipients(
  db: Db,
  crewId: string,
  roles: readonly Role[],
  alsoUserIds: readonly string[] = [],
): Promise<RecipientRow[]> {
  const { rows } = await sql<RecipientRow>`
    select u.id as user_id, u.email, u.display_name, cm.role, (u.email_verified_at is not null) as email_verified
    from crew_members cm join users u on u.id = cm.user_id
    where cm.crew_id = ${crewId}::uuid
      and (cm.role = any(${[...roles]}::text[]) or cm.user_id = any(${[...alsoUserIds]}::text[]))
    order by u.id`.execute(db);
  return rows;
}

export interface ImportFindingRow {
  machine_id: string;
  machine_name: string;
  owner_user_id: string;
  /** The machine's findings at act and at watch, and its samples with any, over the whole import. */
  machine_acts: number;
  machine_watches: number;
  machine_samples: number;
  sample_id: string;
  bottle_code: string;
  drawn_on: string;
  level: Exclude<Level, 'steady'>;
  measurand: string | null;
  sentence: string;
}

/**
 * Findings at watch or act on the samples whose readings this import wrote: every finding of each machine's
 * newest `samplesPerMachine` samples that have any, by machine and sample (oldest first), each row carrying its
 * machine's counts over the whole import. PostgreSQL counts the rest, so a year's file does not bring its
 * hundred thousand findings (and their sentences) into the app to fill one mail.
 */
export async function listImportFindings(
  db: Db,
  importId: string,
  samplesPerMachine: number,
): Promise<ImportFindingRow[]> {
  const { rows } = await sql<ImportFindingRow>`
    with flagged as (
      select f.sample_id, f.level, f.measurand, f.sentence, f.rule_id
      from findings f
      where f.level in ('watch', 'act')
        and f.sample_id in (select r.sample_id from readings r where r.lab_import_id = ${importId}::uuid)
    ), per_sample as (
      select s.id, s.machine_id, s.bottle_code, s.drawn_on,
        count(*) filter (where fl.level = 'act') as acts,
        count(*) filter (where fl.level = 'watch') as watches,
        row_number() over (partition by s.machine_id order by s.drawn_on desc, s.id desc) as newest
      from flagged fl join samples s on s.id = fl.sample_id
      group by s.id
    ), per_machine as (
      select machine_id, sum(acts)::int as acts, sum(watches)::int as watches, count(*)::int as samples
      from per_sample group by machine_id
    )
    select m.id as machine_id, m.name as machine_name, m.owner_user_id,
      pm.acts as machine_acts, pm.watches as machine_watches, pm.samples as machine_samples,
      ps.id as sample_id, ps.bottle_code, ps.drawn_on::text as drawn_on, fl.level, fl.measurand, fl.sentence
    from per_sample ps
    join per_machine pm on pm.machine_id = ps.machine_id
    join machines m on m.id = ps.machine_id
    join flagged fl on fl.sample_id = ps.id
    where ps.newest <= ${samplesPerMachine}
    order by m.name, m.id, ps.drawn_on, ps.id, fl.level, fl.measurand nulls last, fl.rule_id`.execute(db);
  return rows;
}

/** The import's crew, crew name and file name. */
export async function findImportHeader(db: Db, importId: string) {
  return db
    .selectFrom('lab_imports')
    .innerJoin('lab_files', 'lab_files.id', 'lab_imports.lab_file_id')
    .innerJoin('crews', 'crews.id', 'lab_imports.crew_id')
    .select(['lab_imports.id', 'lab_imports.crew_id', 'crews.name as crew_name', 'lab_files.file_name'])
    .where('lab_imports.id', '=', importId)
    .executeTakeFirst();
}

/** The crew's name. */
export async function findCrewName(db: Db, crewId: string): Promise<string | null> {
  const row = await db.selectFrom('crews').select('name').where('id', '=', crewId).executeTakeFirst();
  return row?.name ?? null;
}

/** Records that a user was given an alert; false when that key was already given (nothing written). */
export async function insertAlertDelivery(
  db: Db,
  row: { dedupeKey: string; userId: string; crewId: string; kind: NotificationKind; delivery: 'immediate' | 'digest' },
): Promise<boolean> {
  const written = await db
    .insertInto('alert_deliveries')
    .values({
      dedupe_key: row.dedupeKey,
      user_id: row.userId,
      crew_id: row.crewId,
      kind: row.kind,
      delivery: row.delivery,
    })
    .onConflict((oc) => oc.column('dedupe_key').doNothing())
    .returning('dedupe_key')
    .executeTakeFirst();
  return written !== undefined;
}

/** Files an alert for the user's next daily digest. */
export async function insertDigestItem(
  db: Db,
  row: { dedupeKey: string; userId: string; crewId: string; kind: NotificationKind; title: string; lines: AlertLine[] },
): Promise<void> {
  await db
    .insertInto('alert_digest_items')
    .values({
      dedupe_key: row.dedupeKey,
      user_id: row.userId,
      crew_id: row.crewId,
      kind: row.kind,
      title: row.title,
      lines: JSON.stringify(row.lines),
    })
    .execute();
}

/** Users with digest items waiting that were filed before `before`. */
export async function listUsersWithPendingDigest(db: Db, before: Date): Promise<string[]> {
  const rows = await db
    .selectFrom('alert_digest_items')
    .select('user_id')
    .distinct()
    .where('digested_at', 'is', null)
    .where('created_at', '<=', before)
    .orderBy('user_id')
    .execute();
  return rows.map((r) => r.user_id);
}

/** Locks a user's waiting digest items (skipping ones another digest run holds), oldest first, with crew names. */
export async function lockPendingDigestItems(trx: Transaction<Database>, userId: string, before: Date) {
  const { rows } = await sql<{
    id: string;
    crew_id: string;
    crew_name: string;
    kind: NotificationKind;
    title: string;
    lines: AlertLine[];
  }>`
    select i.id, i.crew_id, c.name as crew_name, i.kind, i.title, i.lines
    from alert_digest_items i join crews c on c.id = i.crew_id
    where i.user_id = ${userId} and i.digested_at is null and i.created_at <= ${before}
    order by i.created_at, i.id
    for update of i skip locked`.execute(trx);
  return rows;
}

/** Marks digest items as sent in the digest with this key. */
export async function markDigested(
  trx: Transaction<Database>,
  ids: readonly string[],
  digestKey: string,
  at: Date,
): Promise<void> {
  if (ids.length === 0) return;
  await trx
    .updateTable('alert_digest_items')
    .set({ digested_at: at, digest_key: digestKey })
    .where('id', 'in', [...ids])
    .execute();
}

/** Whether a message with this idempotency key is already in the outbox (sent or waiting). */
export async function hasOutboxKey(db: Db, key: string): Promise<boolean> {
  const row = await db.selectFrom('mail_outbox').select('id').where('idempotency_key', '=', key).executeTakeFirst();
  return row !== undefined;
}

/** A user's address and whether it is confirmed. */
export async function findUserAddress(db: Db, userId: string) {
  return db
    .selectFrom('users')
    .select(['id', 'email', 'display_name', sql<boolean>`email_verified_at is not null`.as('email_verified')])
    .where('id', '=', userId)
    .executeTakeFirst();
}
