import { sql, type Kysely } from 'kysely';

// A wear part's forecast starts at the middle of its new range at the odometer it was fitted (a clutch
// replaced at 20,000 km starts there, not at 0), and its figures are shown in the unit the service manual
// gives them in (in or mm), whatever the reader's own preference.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table wear_parts
    add column fitted_odometer double precision not null default 0 check (fitted_odometer >= 0),
    add column manual_unit text not null default 'mm' check (manual_unit in ('in', 'mm'))`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table wear_parts drop column fitted_odometer, drop column manual_unit`.execute(db);
}
