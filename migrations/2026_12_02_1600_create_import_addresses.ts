import { sql, type Kysely } from 'kysely';

// Lab reports by e-mail. Each crew has one import address (a random token in the local part, rotatable),
// an optional allow-list of the lab addresses it accepts mail from, and a log of inbound messages: the raw
// message is stored first (status "received") and processed later by the job worker, so a crash between
// receipt and processing loses nothing. Lab files that came by mail point back at their message and have no
// uploader. A new kind of notification tells mechanics and leads that a report is waiting for their confirm.
const OLD_KINDS = `'import_findings', 'sample_due', 'shipped_overdue', 'invitation_pending'`;
const NEW_KINDS = `${OLD_KINDS}, 'lab_report_arrived'`;
const KIND_TABLES = ['notification_preferences', 'alert_deliveries', 'alert_digest_items'];

export async function up(db: Kysely<any>): Promise<void> {
  await sql`create table import_addresses (
    crew_id uuid primary key references crews(id) on delete cascade,
    token text not null unique check (token ~ '^[a-z0-9]{16,64}$'),
    created_at timestamptz not null default now(),
    rotated_at timestamptz,
    rotated_by text references users(id) on delete set null
  )`.execute(db);
  await sql`create table import_address_senders (
    crew_id uuid not null references crews(id) on delete cascade,
    address text not null check (length(address) between 3 and 254),
    added_by text references users(id) on delete set null,
    added_at timestamptz not null default now(),
    primary key (crew_id, address)
  )`.execute(db);
  await sql`create table inbound_mails (
    id uuid primary key default gen_random_uuid(),
    received_at timestamptz not null default now(),
    via text not null check (via in ('smtp', 'webhook')),
    envelope_from text,
    recipient text not null,
    crew_id uuid references crews(id) on delete cascade,
    raw bytea,
    raw_sha256 text,
    byte_size integer not null,
    status text not null check (status in ('received', 'processed', 'set_aside', 'refused')),
    reason text,
    from_address text,
    subject text,
    lab_file_ids jsonb not null default '[]'::jsonb,
    processed_at timestamptz,
    unique (crew_id, raw_sha256)
  )`.execute(db);
  await sql`create index inbound_mails_pending_idx on inbound_mails (received_at) where status = 'received'`.execute(
    db,
  );
  await sql`create index inbound_mails_crew_idx on inbound_mails (crew_id, received_at)`.execute(db);
  await sql`alter table lab_files alter column uploaded_by drop not null`.execute(db);
  await sql`alter table lab_files add column inbound_mail_id uuid references inbound_mails(id) on delete set null`.execute(
    db,
  );
  await sql`alter table lab_profiles add column sheet_name text check (length(sheet_name) <= 200)`.execute(db);
  for (const table of KIND_TABLES) {
    await sql.raw(`alter table ${table} drop constraint ${table}_kind_check`).execute(db);
    await sql.raw(`alter table ${table} add constraint ${table}_kind_check check (kind in (${NEW_KINDS}))`).execute(db);
  }
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const table of KIND_TABLES) {
    await sql.raw(`delete from ${table} where kind = 'lab_report_arrived'`).execute(db);
    await sql.raw(`alter table ${table} drop constraint ${table}_kind_check`).execute(db);
    await sql.raw(`alter table ${table} add constraint ${table}_kind_check check (kind in (${OLD_KINDS}))`).execute(db);
  }
  await sql`alter table lab_profiles drop column sheet_name`.execute(db);
  await sql`alter table lab_files drop column inbound_mail_id`.execute(db);
  // Files that came by mail have no uploader; the older schema cannot hold them.
  await sql`delete from lab_files where uploaded_by is null`.execute(db);
  await sql`alter table lab_files alter column uploaded_by set not null`.execute(db);
  await sql`drop table inbound_mails`.execute(db);
  await sql`drop table import_address_senders`.execute(db);
  await sql`drop table import_addresses`.execute(db);
}
