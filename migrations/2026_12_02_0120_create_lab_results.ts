import { sql, type Kysely } from 'kysely';

// Lab files (kept raw, with their hash), saved column profiles, imports, readings with their replaced
// values, findings, interval calls, review notes and the crew's editable fixed limits.
const UP = [
  `create table lab_files (
    id uuid primary key default gen_random_uuid(),
    crew_id uuid not null references crews(id) on delete cascade,
    sha256 text not null,
    file_name text not null,
    byte_size integer not null,
    content bytea not null,
    uploaded_by text not null references users(id),
    uploaded_at timestamptz not null default now(),
    unique (crew_id, sha256)
  )`,
  `create table lab_profiles (
    id uuid primary key default gen_random_uuid(),
    crew_id uuid not null references crews(id) on delete cascade,
    name text not null check (length(name) between 1 and 80),
    header_signature text not null,
    mapping jsonb not null,
    created_by text not null references users(id),
    created_at timestamptz not null default now(),
    unique (crew_id, header_signature)
  )`,
  `create table lab_imports (
    id uuid primary key default gen_random_uuid(),
    crew_id uuid not null references crews(id) on delete cascade,
    lab_file_id uuid not null references lab_files(id) on delete cascade,
    confirmed_by text not null references users(id),
    confirmed_at timestamptz not null default now(),
    samples_written integer not null,
    readings_written integer not null,
    unique (lab_file_id)
  )`,
  `create table readings (
    sample_id uuid not null references samples(id) on delete cascade,
    measurand text not null,
    value double precision not null,
    qualifier text check (qualifier in ('<', '>')),
    lab_import_id uuid references lab_imports(id) on delete set null,
    primary key (sample_id, measurand)
  )`,
  `create table reading_history (
    id bigserial primary key,
    sample_id uuid not null references samples(id) on delete cascade,
    measurand text not null,
    value double precision not null,
    qualifier text,
    replaced_by_import uuid references lab_imports(id) on delete set null,
    replaced_at timestamptz not null default now()
  )`,
  `create table findings (
    id uuid primary key default gen_random_uuid(),
    sample_id uuid not null references samples(id) on delete cascade,
    measurand text,
    level text not null check (level in ('steady', 'watch', 'act')),
    rule_id text not null,
    numbers jsonb not null default '{}'::jsonb,
    sentence text not null,
    created_at timestamptz not null default now()
  )`,
  `create index findings_sample_idx on findings (sample_id)`,
  `create table interval_calls (
    id uuid primary key default gen_random_uuid(),
    sample_id uuid not null references samples(id) on delete cascade,
    machine_id uuid not null references machines(id) on delete cascade,
    call text not null check (call in ('shorten', 'hold', 'stretch')),
    next_interval double precision,
    next_sample_odometer double precision,
    next_sample_on date,
    reasons jsonb not null default '[]'::jsonb,
    source text not null check (source in ('engine', 'confirmed', 'override')),
    note text not null default '',
    made_by text references users(id),
    created_at timestamptz not null default now()
  )`,
  `create index interval_calls_sample_idx on interval_calls (sample_id, created_at)`,
  `create index interval_calls_machine_idx on interval_calls (machine_id, created_at)`,
  `create table review_notes (
    id uuid primary key default gen_random_uuid(),
    sample_id uuid not null references samples(id) on delete cascade,
    author_user_id text not null references users(id),
    body text not null check (length(body) between 1 and 4000),
    created_at timestamptz not null default now()
  )`,
  `create table crew_limits (
    crew_id uuid not null references crews(id) on delete cascade,
    measurand text not null,
    watch_at double precision,
    act_at double precision,
    updated_by text references users(id),
    updated_at timestamptz not null default now(),
    primary key (crew_id, measurand)
  )`,
];

const DOWN = [
  'crew_limits',
  'review_notes',
  'interval_calls',
  'findings',
  'reading_history',
  'readings',
  'lab_imports',
  'lab_profiles',
  'lab_files',
];

export async function up(db: Kysely<any>): Promise<void> {
  for (const statement of UP) await sql.raw(statement).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const table of DOWN) await db.schema.dropTable(table).execute();
}
