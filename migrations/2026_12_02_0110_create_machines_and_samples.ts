import { sql, type Kysely } from 'kysely';

// Machines, oil changes, photos, samples (drain cards) and their state history, wear parts and their
// measurements. Distances are stored in km (or engine hours for an hour meter), lengths in mm, volumes
// in litres: one canonical unit each, converted at the edges.
const UP = [
  `create table machines (
    id uuid primary key default gen_random_uuid(),
    crew_id uuid not null references crews(id) on delete cascade,
    owner_user_id text not null references users(id),
    name text not null check (length(name) between 1 and 80),
    model_year integer check (model_year between 1900 and 2100),
    engine_layout text not null check (engine_layout in ('single', 'twin', 'triple', 'four', 'other')),
    displacement_cc integer check (displacement_cc between 20 and 3000),
    cooling text not null check (cooling in ('air', 'oil', 'liquid')),
    shared_oil boolean not null default true,
    oil_capacity_l double precision check (oil_capacity_l > 0 and oil_capacity_l < 40),
    meter text not null check (meter in ('mi', 'km', 'h')),
    recommended_grades jsonb not null default '[]'::jsonb,
    max_interval_distance double precision check (max_interval_distance > 0),
    max_interval_days integer check (max_interval_days > 0),
    notes text not null default '',
    archived_at timestamptz,
    created_at timestamptz not null default now(),
    updated_at timestamptz not null default now()
  )`,
  `create index machines_crew_idx on machines (crew_id) where archived_at is null`,
  `create table oil_changes (
    id uuid primary key default gen_random_uuid(),
    crew_id uuid not null references crews(id) on delete cascade,
    machine_id uuid not null references machines(id) on delete cascade,
    changed_on date not null,
    odometer double precision not null check (odometer >= 0),
    meter_replaced boolean not null default false,
    oil_product text not null default '',
    sae_grade text not null,
    volume_l double precision check (volume_l > 0 and volume_l < 40),
    filter_changed boolean not null default false,
    top_up_l double precision not null default 0 check (top_up_l >= 0),
    other_work jsonb not null default '[]'::jsonb,
    notes text not null default '',
    created_by text not null references users(id),
    created_at timestamptz not null default now()
  )`,
  `create index oil_changes_machine_idx on oil_changes (machine_id, odometer)`,
  `create table photos (
    id uuid primary key default gen_random_uuid(),
    crew_id uuid not null references crews(id) on delete cascade,
    oil_change_id uuid references oil_changes(id) on delete set null,
    sha256 text not null,
    content_type text not null,
    byte_size integer not null,
    width integer,
    height integer,
    caption text not null default '',
    created_by text not null references users(id),
    created_at timestamptz not null default now()
  )`,
  `create index photos_oil_change_idx on photos (oil_change_id)`,
  `create table samples (
    id uuid primary key default gen_random_uuid(),
    crew_id uuid not null references crews(id) on delete cascade,
    machine_id uuid not null references machines(id) on delete cascade,
    oil_change_id uuid references oil_changes(id) on delete set null,
    bottle_code text not null,
    bottle_code_norm text not null,
    issued_code boolean not null default false,
    drawn_on date not null,
    odometer double precision not null check (odometer >= 0),
    distance_on_oil double precision check (distance_on_oil >= 0),
    top_up_l double precision not null default 0 check (top_up_l >= 0),
    sae_grade text,
    oil_product text not null default '',
    draw_method text not null default 'midstream' check (draw_method in ('midstream', 'pump', 'valve')),
    state text not null default 'drawn' check (state in ('drawn', 'shipped', 'results_in', 'reviewed')),
    tracking_note text not null default '',
    in_baseline boolean not null default true,
    client_key text,
    created_by text not null references users(id),
    created_at timestamptz not null default now(),
    unique (crew_id, bottle_code_norm)
  )`,
  `create unique index samples_client_key_key on samples (crew_id, client_key) where client_key is not null`,
  `create index samples_machine_idx on samples (machine_id, drawn_on)`,
  `create index samples_state_idx on samples (crew_id, state)`,
  `create table sample_events (
    id bigserial primary key,
    sample_id uuid not null references samples(id) on delete cascade,
    state text not null,
    note text not null default '',
    actor_user_id text references users(id),
    at timestamptz not null default now()
  )`,
  `create index sample_events_sample_idx on sample_events (sample_id, at)`,
  `create table wear_parts (
    id uuid primary key default gen_random_uuid(),
    crew_id uuid not null references crews(id) on delete cascade,
    machine_id uuid not null references machines(id) on delete cascade,
    name text not null check (length(name) between 1 and 80),
    piece_count integer not null default 1 check (piece_count between 1 and 64),
    new_min_mm double precision not null check (new_min_mm > 0),
    new_max_mm double precision not null check (new_max_mm >= new_min_mm),
    service_limit_mm double precision not null check (service_limit_mm > 0),
    limit_direction text not null default 'min' check (limit_direction in ('min', 'max')),
    notes text not null default '',
    created_at timestamptz not null default now()
  )`,
  `create table wear_measurements (
    id uuid primary key default gen_random_uuid(),
    wear_part_id uuid not null references wear_parts(id) on delete cascade,
    measured_on date not null,
    odometer double precision not null check (odometer >= 0),
    pieces_mm jsonb not null default '[]'::jsonb,
    summary_mm double precision not null check (summary_mm >= 0),
    note text not null default '',
    created_by text not null references users(id),
    created_at timestamptz not null default now()
  )`,
  `create index wear_measurements_part_idx on wear_measurements (wear_part_id, odometer)`,
];

const DOWN = ['wear_measurements', 'wear_parts', 'sample_events', 'samples', 'photos', 'oil_changes', 'machines'];

export async function up(db: Kysely<any>): Promise<void> {
  for (const statement of UP) await sql.raw(statement).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const table of DOWN) await db.schema.dropTable(table).execute();
}
