import { sql, type Kysely } from 'kysely';

// A stored band says whose samples it came from: the machine's own, or the crew's other machines of the same
// engine while its own baseline builds (the crew reference), with the label screens show beside it and how many
// machines it pooled. Existing bands are the machine's own.
const UP = [
  `alter table baseline_bands
     add column source text not null default 'own' check (source in ('own', 'crew')),
     add column source_label text check (length(source_label) <= 200),
     add column source_machines integer check (source_machines >= 0),
     add constraint baseline_bands_crew_label check (source = 'own' or source_label is not null)`,
];

const DOWN = [
  `alter table baseline_bands drop constraint baseline_bands_crew_label, drop column source_machines, drop column source_label, drop column source`,
];

export async function up(db: Kysely<any>): Promise<void> {
  for (const statement of UP) await sql.raw(statement).execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const statement of DOWN) await sql.raw(statement).execute(db);
}
