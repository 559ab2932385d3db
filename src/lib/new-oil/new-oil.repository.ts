/** Every query of the new-oil references. `db` may be a transaction. */
import { sql, type Kysely, type Transaction } from 'kysely';
import type { Database, NewOilReadingJson, NewOilReferenceRow } from '../db/database';

type Db = Kysely<Database> | Transaction<Database>;

/** The crew's references, by product name then source. */
export function findReferencesOfCrew(db: Db, crewId: string, limit = 500): Promise<NewOilReferenceRow[]> {
  return db
    .selectFrom('new_oil_references')
    .selectAll()
    .where('crew_id', '=', crewId)
    .orderBy('product_key')
    .orderBy('source')
    .limit(limit)
    .execute();
}

/** One reference of the crew, or undefined (another crew's id looks the same as a missing one). */
export function findReferenceOfCrew(db: Db, crewId: string, id: string): Promise<NewOilReferenceRow | undefined> {
  return db
    .selectFrom('new_oil_references')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('id', '=', id)
    .executeTakeFirst();
}

/** The crew's references of one product (both sources). */
export function findReferencesOfProduct(db: Db, crewId: string, productKey: string): Promise<NewOilReferenceRow[]> {
  return db
    .selectFrom('new_oil_references')
    .selectAll()
    .where('crew_id', '=', crewId)
    .where('product_key', '=', productKey)
    .execute();
}

/** The reference of a product and source, other than `exceptId`: what a save would collide with. */
export function findClash(
  db: Db,
  crewId: string,
  productKey: string,
  source: 'lab' | 'data-sheet',
  exceptId: string | null,
) {
  let q = db
    .selectFrom('new_oil_references')
    .select(['id', 'product_name'])
    .where('crew_id', '=', crewId)
    .where('product_key', '=', productKey)
    .where('source', '=', source);
  if (exceptId) q = q.where('id', '!=', exceptId);
  return q.executeTakeFirst();
}

/** A reference bottle of the crew with this normalised code, other than `exceptId`. */
export function findBottleClash(db: Db, crewId: string, codeNorm: string, exceptId: string | null) {
  let q = db
    .selectFrom('new_oil_references')
    .select(['id', 'product_name'])
    .where('crew_id', '=', crewId)
    .where('bottle_code_norm', '=', codeNorm);
  if (exceptId) q = q.where('id', '!=', exceptId);
  return q.executeTakeFirst();
}

/** A used-oil sample of the crew with this normalised bottle code. */
export function findSampleWithCode(db: Db, crewId: string, codeNorm: string) {
  return db
    .selectFrom('samples')
    .select(['id'])
    .where('crew_id', '=', crewId)
    .where('bottle_code_norm', '=', codeNorm)
    .executeTakeFirst();
}

export interface ReferenceValues {
  productName: string;
  productKey: string;
  source: 'lab' | 'data-sheet';
  saeGrade: string;
  readings: Record<string, NewOilReadingJson>;
  bottleCode: string | null;
  bottleCodeNorm: string | null;
  note: string;
}

/** Inserts a reference. */
export function insertReference(
  db: Db,
  crewId: string,
  userId: string,
  v: ReferenceValues,
): Promise<NewOilReferenceRow> {
  return db
    .insertInto('new_oil_references')
    .values({
      crew_id: crewId,
      product_name: v.productName,
      product_key: v.productKey,
      source: v.source,
      sae_grade: v.saeGrade,
      readings: JSON.stringify(v.readings),
      bottle_code: v.bottleCode,
      bottle_code_norm: v.bottleCodeNorm,
      note: v.note,
      created_by: userId,
    })
    .returningAll()
    .executeTakeFirstOrThrow();
}

/** Updates a reference; `clearResults` empties a lab reference's results (its bottle changed). */
export function updateReference(
  db: Db,
  crewId: string,
  id: string,
  v: ReferenceValues,
  clearResults: boolean,
): Promise<NewOilReferenceRow | undefined> {
  return db
    .updateTable('new_oil_references')
    .set({
      product_name: v.productName,
      product_key: v.productKey,
      sae_grade: v.saeGrade,
      note: v.note,
      bottle_code: v.bottleCode,
      bottle_code_norm: v.bottleCodeNorm,
      updated_at: sql`now()`,
      ...(v.source === 'data-sheet' || clearResults ? { readings: JSON.stringify(v.readings) } : {}),
      ...(clearResults ? { lab_import_id: null, results_on: null } : {}),
    })
    .where('crew_id', '=', crewId)
    .where('id', '=', id)
    .returningAll()
    .executeTakeFirst();
}

/** Deletes a reference of the crew; true when one was deleted. */
export async function deleteReference(db: Db, crewId: string, id: string): Promise<boolean> {
  const r = await db
    .deleteFrom('new_oil_references')
    .where('crew_id', '=', crewId)
    .where('id', '=', id)
    .executeTakeFirst();
  return Number(r.numDeletedRows) > 0;
}

/** The crew's lab reference bottles among these normalised codes (for matching a lab file's rows). */
export async function findReferenceBottles(db: Db, crewId: string, codes: readonly string[]) {
  if (codes.length === 0) return [];
  return db
    .selectFrom('new_oil_references')
    .select(['id', 'product_name', 'bottle_code_norm', 'lab_import_id'])
    .where('crew_id', '=', crewId)
    .where('bottle_code_norm', '=', sql<string>`any(${sql.val(codes)}::text[])`)
    .execute();
}

/** Writes a lab's results into a reference bottle (the previous results, if any, are replaced). */
export function writeLabResults(
  db: Db,
  crewId: string,
  id: string,
  readings: Record<string, NewOilReadingJson>,
  importId: string,
  resultsOn: string,
) {
  return db
    .updateTable('new_oil_references')
    .set({ readings: JSON.stringify(readings), lab_import_id: importId, results_on: resultsOn, updated_at: sql`now()` })
    .where('crew_id', '=', crewId)
    .where('id', '=', id)
    .where('source', '=', 'lab')
    .executeTakeFirst();
}

/** The reference bottles an import wrote, by normalised code. */
export async function findCodesWrittenByImport(db: Db, importId: string): Promise<Set<string>> {
  const rows = await db
    .selectFrom('new_oil_references')
    .select('bottle_code_norm')
    .where('lab_import_id', '=', importId)
    .execute();
  return new Set(rows.flatMap((r) => (r.bottle_code_norm ? [r.bottle_code_norm] : [])));
}

/**
 * Oil products poured on the crew's machines, as typed on oil changes (each spelling once), with the
 * machines that had it and the latest day; the service merges spellings by the normalised name.
 */
export function findProductsInUse(db: Db, crewId: string, limit = 500) {
  return db
    .selectFrom('oil_changes')
    .select([
      'oil_product',
      sql<string>`max(sae_grade)`.as('sae_grade'),
      sql<string[]>`array_agg(distinct machine_id::text)`.as('machine_ids'),
      sql<string>`max(changed_on)::text`.as('last_changed_on'),
    ])
    .where('crew_id', '=', crewId)
    .where(sql<boolean>`btrim(oil_product) <> ''`)
    .groupBy('oil_product')
    .orderBy(sql`max(changed_on)`, 'desc')
    .limit(limit)
    .execute();
}

/** The oil product of a machine's latest oil change, or undefined. */
export function findLatestProductOfMachine(db: Db, crewId: string, machineId: string) {
  return db
    .selectFrom('oil_changes')
    .select(['oil_product', 'sae_grade'])
    .where('crew_id', '=', crewId)
    .where('machine_id', '=', machineId)
    .orderBy('changed_on', 'desc')
    .orderBy('odometer', 'desc')
    .limit(1)
    .executeTakeFirst();
}
