/**
 * New-oil reference rules: who may record one, one per product and source, bottle codes that cannot be
 * mistaken for a used-oil sample, the audit trail, and the lookup the analysis reads.
 */
import type { Kysely, Transaction } from 'kysely';
import { recordAuditEvent } from '../audit/audit.repository';
import { canRecordNewOilReference } from '../auth/permissions';
import type { Database, NewOilReadingJson } from '../db/database';
import { isUuid } from '../ids';
import type { Actor } from '~/lib/auth/types';
import { refuse, refuseInvalid, refuseNotFound, succeed, type Result } from '~/lib/http/result';
import { parseSaeGrade } from '../oil-changes/sae-grade';
import { normaliseBottleCode } from '../samples/bottle-code';
import type { LabReadings } from '../lab-csv/lab-csv';
import type { PreviewRow } from '../lab-import/lab-import';
import {
  buildNewOilLookup,
  newOilInputSchema,
  normaliseProductName,
  readingsFromDataSheet,
  toNewOilReference,
  type NewOilLookup,
  type NewOilReference,
} from './new-oil';
import * as repo from './new-oil.repository';

type Db = Kysely<Database> | Transaction<Database>;

const FORBIDDEN = 'Only members of this crew can record its new-oil references.';

/** The crew's references, by product. */
export async function listNewOilReferences(db: Db, actor: Actor): Promise<NewOilReference[]> {
  if (!canRecordNewOilReference(actor.membership)) return [];
  return (await repo.findReferencesOfCrew(db, actor.membership.crewId)).map(toNewOilReference);
}

/** One reference of the crew. */
export async function getNewOilReference(db: Db, actor: Actor, id: string): Promise<Result<NewOilReference>> {
  if (!isUuid(id)) return refuseNotFound('new-oil reference');
  const row = await repo.findReferenceOfCrew(db, actor.membership.crewId, id);
  return row ? succeed(toNewOilReference(row)) : refuseNotFound('new-oil reference');
}

/** An oil product poured on the crew's machines, and whether it has a reference with figures. */
export interface ProductInUse {
  productKey: string;
  productName: string;
  saeGrade: string;
  machines: number;
  lastChangedOn: string;
  references: NewOilReference[];
}

/** The oil products on the crew's oil changes, merged by normalised name, each with its references. */
export async function listProductsInUse(db: Db, actor: Actor): Promise<ProductInUse[]> {
  const crewId = actor.membership.crewId;
  const [rows, refs] = await Promise.all([repo.findProductsInUse(db, crewId), repo.findReferencesOfCrew(db, crewId)]);
  const references = refs.map(toNewOilReference);
  const byKey = new Map<string, ProductInUse & { machineIds: Set<string> }>();
  for (const r of rows) {
    const key = normaliseProductName(r.oil_product);
    const entry = byKey.get(key) ?? {
      productKey: key,
      productName: r.oil_product.trim(),
      saeGrade: r.sae_grade,
      machines: 0,
      lastChangedOn: r.last_changed_on,
      references: references.filter((x) => x.productKey === key),
      machineIds: new Set<string>(),
    };
    for (const id of r.machine_ids) entry.machineIds.add(id);
    entry.machines = entry.machineIds.size;
    if (r.last_changed_on > entry.lastChangedOn) entry.lastChangedOn = r.last_changed_on;
    byKey.set(key, entry);
  }
  return [...byKey.values()].map(({ machineIds: _ids, ...p }) => p);
}

/** What the machine page says about the oil in the engine: its product and that product's references. */
export async function describeMachineOil(
  db: Db,
  actor: Actor,
  machineId: string,
): Promise<{ productName: string; saeGrade: string; references: NewOilReference[] } | null> {
  if (!isUuid(machineId)) return null;
  const latest = await repo.findLatestProductOfMachine(db, actor.membership.crewId, machineId);
  if (!latest || latest.oil_product.trim() === '') return null;
  const refs = await repo.findReferencesOfProduct(
    db,
    actor.membership.crewId,
    normaliseProductName(latest.oil_product),
  );
  return {
    productName: latest.oil_product.trim(),
    saeGrade: latest.sae_grade,
    references: refs.map(toNewOilReference),
  };
}

async function validate(
  db: Db,
  actor: Actor,
  input: unknown,
  exceptId: string | null,
): Promise<Result<repo.ReferenceValues>> {
  const parsed = newOilInputSchema.safeParse(input);
  if (!parsed.success) return refuseInvalid(parsed.error);
  const d = parsed.data;
  const fields: Record<string, string> = {};
  let saeGrade = '';
  if (d.saeGrade !== '') {
    const g = parseSaeGrade(d.saeGrade);
    if (g.ok) saeGrade = g.grade;
    else fields['saeGrade'] = g.message;
  }
  const crewId = actor.membership.crewId;
  const productKey = normaliseProductName(d.productName);
  const clash = await repo.findClash(db, crewId, productKey, d.source, exceptId);
  if (clash) {
    fields['productName'] =
      d.source === 'lab'
        ? `“${clash.product_name}” already has a lab bottle of new oil registered; open it to change its bottle code.`
        : `“${clash.product_name}” already has data-sheet figures; open them to change them.`;
  }
  let bottleCode: string | null = null;
  let bottleCodeNorm: string | null = null;
  if (d.source === 'lab') {
    bottleCode = d.bottleCode;
    bottleCodeNorm = normaliseBottleCode(d.bottleCode);
    if (await repo.findSampleWithCode(db, crewId, bottleCodeNorm)) {
      fields['bottleCode'] =
        `Bottle “${d.bottleCode}” is already a used-oil sample of this crew; the bottle of new oil needs a code of its own.`;
    } else {
      const other = await repo.findBottleClash(db, crewId, bottleCodeNorm, exceptId);
      if (other)
        fields['bottleCode'] = `Bottle “${d.bottleCode}” is already the new-oil bottle of “${other.product_name}”.`;
    }
  }
  if (Object.keys(fields).length > 0) return refuse(400, 'invalid_input', 'Some fields need attention.', fields);
  const readings: Record<string, NewOilReadingJson> =
    d.source === 'data-sheet' ? ({ ...readingsFromDataSheet(d) } as Record<string, NewOilReadingJson>) : {};
  return succeed({
    productName: d.productName.replace(/\s+/g, ' '),
    productKey,
    source: d.source,
    saeGrade,
    readings,
    bottleCode,
    bottleCodeNorm,
    note: d.note,
  });
}

/** Records a new-oil reference of an oil product for the actor's crew. */
export async function createNewOilReference(
  db: Kysely<Database>,
  actor: Actor,
  input: unknown,
): Promise<Result<NewOilReference>> {
  if (!canRecordNewOilReference(actor.membership)) return refuse(403, 'forbidden', FORBIDDEN);
  return db.transaction().execute(async (trx) => {
    const v = await validate(trx, actor, input, null);
    if (!v.ok) return v;
    const row = await repo.insertReference(trx, actor.membership.crewId, actor.userId, v.value);
    await recordAuditEvent(trx, {
      kind: 'new_oil_reference_saved',
      crewId: actor.membership.crewId,
      actorUserId: actor.userId,
      detail: {
        referenceId: row.id,
        product: row.product_name,
        source: row.source,
        figures: Object.keys(v.value.readings),
      },
    });
    return succeed(toNewOilReference(row));
  });
}

/**
 * Changes a reference. Its source stays what it was. A lab reference whose bottle code changes loses its
 * results: they belonged to the old bottle, and the new bottle's come with the next import.
 */
export async function updateNewOilReference(
  db: Kysely<Database>,
  actor: Actor,
  id: string,
  input: unknown,
): Promise<Result<NewOilReference>> {
  if (!canRecordNewOilReference(actor.membership)) return refuse(403, 'forbidden', FORBIDDEN);
  const found = await getNewOilReference(db, actor, id);
  if (!found.ok) return found;
  const body =
    typeof input === 'object' && input !== null
      ? { ...(input as Record<string, unknown>), source: found.value.source }
      : input;
  return db.transaction().execute(async (trx) => {
    const v = await validate(trx, actor, body, id);
    if (!v.ok) return v;
    const clearResults =
      v.value.source === 'lab' && normaliseBottleCode(found.value.bottleCode ?? '') !== v.value.bottleCodeNorm;
    const row = await repo.updateReference(trx, actor.membership.crewId, id, v.value, clearResults);
    if (!row) return refuseNotFound('new-oil reference');
    await recordAuditEvent(trx, {
      kind: 'new_oil_reference_saved',
      crewId: actor.membership.crewId,
      actorUserId: actor.userId,
      detail: { referenceId: id, product: row.product_name, source: row.source, resultsCleared: clearResults },
    });
    return succeed(toNewOilReference(row));
  });
}

/** Deletes a reference of the crew. */
export async function deleteNewOilReference(
  db: Kysely<Database>,
  actor: Actor,
  id: string,
): Promise<Result<{ id: string }>> {
  if (!canRecordNewOilReference(actor.membership)) return refuse(403, 'forbidden', FORBIDDEN);
  const found = await getNewOilReference(db, actor, id);
  if (!found.ok) return found;
  return db.transaction().execute(async (trx) => {
    if (!(await repo.deleteReference(trx, actor.membership.crewId, id))) return refuseNotFound('new-oil reference');
    await recordAuditEvent(trx, {
      kind: 'new_oil_reference_deleted',
      crewId: actor.membership.crewId,
      actorUserId: actor.userId,
      detail: { referenceId: id, product: found.value.productName, source: found.value.source },
    });
    return succeed({ id });
  });
}

// ---- the lab import and the analysis ----

/** A row of a lab file whose bottle is a registered bottle of new oil. */
export interface NewOilImportRow {
  line: number;
  bottle: string;
  bottleNorm: string;
  referenceId: string;
  productName: string;
  /** True when this bottle already has results (they are replaced on confirm). */
  hasResults: boolean;
  readings: LabReadings;
  sampled: string | null;
  reported: string | null;
  /** Errors of the row from the reader: the import is refused while any remain. */
  errors: PreviewRow['errors'];
  /** For a file already imported: whether this row went into its reference. */
  written: boolean;
}

/**
 * Takes the rows whose bottle is no used-oil sample of the crew but one of its registered bottles of new
 * oil out of a preview's rows: they are written into their new-oil reference, not onto a machine.
 */
export function splitNewOilRows(
  rows: readonly PreviewRow[],
  bottles: ReadonlyMap<string, { referenceId: string; productName: string; hasResults: boolean }>,
  writtenCodes: ReadonlySet<string> | null,
): { rows: PreviewRow[]; newOilRows: NewOilImportRow[] } {
  const kept: PreviewRow[] = [];
  const newOilRows: NewOilImportRow[] = [];
  for (const r of rows) {
    const bottle = r.match.kind === 'unknown' ? bottles.get(r.bottleNorm) : undefined;
    if (!bottle) {
      kept.push(r);
      continue;
    }
    newOilRows.push({
      line: r.line,
      bottle: r.bottle,
      bottleNorm: r.bottleNorm,
      ...bottle,
      readings: r.readings,
      sampled: r.sampled,
      reported: r.reported,
      errors: r.errors,
      written: writtenCodes?.has(r.bottleNorm) ?? false,
    });
  }
  return { rows: kept, newOilRows };
}

/** The crew's new-oil bottles among a file's normalised codes, by code. */
export async function findNewOilBottles(db: Db, crewId: string, codes: readonly string[]) {
  const rows = await repo.findReferenceBottles(db, crewId, [...new Set(codes)]);
  return new Map(
    rows.map((r) => [
      r.bottle_code_norm!,
      { referenceId: r.id, productName: r.product_name, hasResults: r.lab_import_id !== null },
    ]),
  );
}

/** The reference bottles an import wrote, by normalised code (to show an imported file as it was written). */
export function findNewOilCodesWrittenBy(db: Db, importId: string): Promise<Set<string>> {
  return repo.findCodesWrittenByImport(db, importId);
}

/** Writes the new-oil rows of a confirmed import into their references, inside the import's transaction. */
export async function writeNewOilResults(
  trx: Db,
  crewId: string,
  rows: readonly NewOilImportRow[],
  importId: string,
  today: string,
): Promise<number> {
  for (const row of rows) {
    const readings: Record<string, NewOilReadingJson> = {};
    for (const [code, r] of Object.entries(row.readings))
      if (r) readings[code] = r.qualifier ? { value: r.value, qualifier: r.qualifier } : { value: r.value };
    await repo.writeLabResults(trx, crewId, row.referenceId, readings, importId, row.sampled ?? row.reported ?? today);
  }
  return rows.length;
}

/** What the analysis engine gets for each of a crew's oil products (see attachNewOil). */
export async function loadNewOilLookup(db: Db, crewId: string): Promise<NewOilLookup> {
  return buildNewOilLookup((await repo.findReferencesOfCrew(db, crewId, 10_000)).map(toNewOilReference));
}
