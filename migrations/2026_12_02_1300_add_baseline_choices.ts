import { sql, type Kysely } from 'kysely';

// Baselines from in-control samples and the fix-first call:
// - a lead or mechanic takes a sample out of the baseline (or puts it back) with a reason, and may mark the
//   first oil of a new or rebuilt engine as break-in;
// - the bands the rules used are stored per sample and measurand, so the wear chart, the sample page and the
//   alerts show exactly those;
// - machines remember which engine version judged their stored findings, so a new engine recomputes them
//   (one transaction per machine, see recomputeStaleMachines);
// - the interval call gains 'fix-first' (fix the cause, resample, interval unchanged).
const UP = [
  `alter table samples
     add column baseline_note text not null default '' check (length(baseline_note) <= 500),
     add column break_in boolean not null default false,
     add column baseline_changed_by text references users(id) on delete set null,
     add column baseline_changed_at timestamptz`,
  `alter table machines add column judged_by text`,
  `alter table interval_calls drop constraint interval_calls_call_check`,
  `alter table interval_calls add constraint interval_calls_call_check check (call in ('shorten', 'hold', 'stretch', 'fix-first'))`,
  `create table baseline_bands (
    sample_id uuid not null references samples(id) on delete cascade,
    measurand text not null,
    basis text not null check (basis in ('rate', 'ppm')),
    n integer not null check (n >= 0),
    mean double precision not null,
    lower_edge double precision not null,
    watch_above double precision not null,
    act_from double precision not null,
    to_reported double precision not null,
    primary key (sample_id, measurand)
  )`,
];

const DOWN = [
  `drop table baseline_bands`,
  `delete from interval_calls where call = 'fix-first'`,
  `alter table interval_calls drop constraint interval_calls_call_check`,
  `alter table interval_calls add constraint interval_calls_call_check check (call in ('shorten', 'hold', 'stretch'))`,
  `alter table machines drop column judged_by`,
  `alter table samples drop column baseline_changed_at, drop column baseline_changed_by, drop column break_in, drop column baseline_note`,
];

export async function up(db: Kysely<any>): Promise<void> {
  for (const statement of UP) await sql.raw(statement).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const statement of DOWN) await sql.raw(statement).execute(db);
}
