import { sql, type Kysely } from 'kysely';

// New-oil references: the oil as poured, per crew and oil product, so the rules can compare a used sample
// with the same oil new (its KV100, its additive levels). A reference comes from the product's data sheet
// (typed in) or from the lab (a bottle of new oil registered here and matched by its bottle code when the
// lab's file is imported). At most one of each source per product; `product_key` is the product name
// trimmed, lower-cased and with runs of spaces made one, so "Trail 10W-40" and "trail  10w-40" are the same.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('new_oil_references')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('crew_id', 'uuid', (c) => c.notNull().references('crews.id').onDelete('cascade'))
    .addColumn('product_name', 'text', (c) => c.notNull().check(sql`length(product_name) between 1 and 120`))
    .addColumn('product_key', 'text', (c) => c.notNull().check(sql`length(product_key) between 1 and 120`))
    .addColumn('source', 'text', (c) => c.notNull().check(sql`source in ('lab', 'data-sheet')`))
    .addColumn('sae_grade', 'text', (c) => c.notNull().defaultTo(''))
    // { "KV100": { "value": 14.1 }, "Zn": { "value": 1100 }, "B": { "value": 1, "qualifier": "<" }, … }
    .addColumn('readings', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .addColumn('bottle_code', 'text')
    .addColumn('bottle_code_norm', 'text')
    .addColumn('lab_import_id', 'uuid', (c) => c.references('lab_imports.id').onDelete('set null'))
    .addColumn('results_on', 'date')
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_by', 'text', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('new_oil_references_product_source_key', ['crew_id', 'product_key', 'source'])
    .addUniqueConstraint('new_oil_references_bottle_key', ['crew_id', 'bottle_code_norm'])
    // A lab reference is a bottle; a data-sheet reference has none.
    .addCheckConstraint('new_oil_references_bottle_check', sql`(source = 'lab') = (bottle_code_norm is not null)`)
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('new_oil_references').execute();
}
