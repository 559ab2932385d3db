import type { Kysely } from 'kysely';
import type { Database } from '../db/database';
import { canActorEdit, getMachine } from '../machines/machines.service';
import type { Machine } from '../machines/machines';
import { refuse, refuseInvalid, succeed, type FieldErrors, type Result } from '~/lib/http/result';
import type { Actor } from '~/lib/auth/types';
import { attachPhotos, findPhotosOfOilChanges, type PhotoRow } from '../photos/photos.repository';
import { storeCheckedPhoto, type CheckedPhoto } from '../photos/photos.service';
import type { PhotoStore } from '../photos/photo-store';
import { formatMeter, toStoredMeter } from '../units/units';
import {
  computeDistances,
  explainAbsurdOdometer,
  oilChangeInputSchema,
  toOilChange,
  type OilChange,
} from './oil-changes';
import {
  findLatestOilChange,
  findOilChangeAfter,
  findOilChangeBefore,
  findOilChangeByClientKey,
  findOilChangesOfMachine,
  insertOilChange,
} from './oil-changes.repository';
import { parseSaeGrade } from './sae-grade';
import { checkCrewQuota } from '../storage-quota/storage-quota';
import { sumCrewStorageBytes } from '../storage-quota/storage-quota.repository';
import { formatDay } from '../words/dates';

/** A machine's oil changes, newest first, each with the distance since the one before and its photos. */
export async function listOilChanges(
  db: Kysely<Database>,
  actor: Actor,
  machineId: string,
): Promise<Result<(OilChange & { photos: PhotoRow[] })[]>> {
  const m = await getMachine(db, actor, machineId);
  if (!m.ok) return m;
  return succeed(await listOilChangesOf(db, actor, m.value));
}

/**
 * The same for a machine the caller already loaded for this actor's crew (the machine page): two queries, without
 * fetching the machine again.
 */
export async function listOilChangesOf(
  db: Kysely<Database>,
  actor: Actor,
  machine: Machine,
): Promise<(OilChange & { photos: PhotoRow[] })[]> {
  const rows = await findOilChangesOfMachine(db, actor.membership.crewId, machine.id);
  const photos = await findPhotosOfOilChanges(
    db,
    actor.membership.crewId,
    rows.map((r) => r.id),
  );
  return computeDistances(rows)
    .reverse()
    .map((c) => ({ ...c, photos: photos.filter((p) => p.oil_change_id === c.id) }));
}

/** The machine's latest oil change (what a drain card prefills from), or null. */
export async function getLatestOilChange(
  db: Kysely<Database>,
  actor: Actor,
  machineId: string,
): Promise<OilChange | null> {
  const row = await findLatestOilChange(db, actor.membership.crewId, machineId);
  return row ? toOilChange(row) : null;
}

/**
 * Logs an oil change. The odometer (machine's own unit) may not go below the previous change's unless the
 * meter was replaced; photos already uploaded (photoIds) are attached, and photos from a plain form post
 * (newPhotos, already checked) are stored in the same transaction. A resend with a known clientKey answers
 * the first oil change (repeated: true) and writes nothing.
 */
export async function createOilChange(
  db: Kysely<Database>,
  actor: Actor,
  machineId: string,
  input: unknown,
  options: { newPhotos?: CheckedPhoto[]; photoStore?: PhotoStore; quotaBytes?: number } = {},
): Promise<Result<OilChange & { repeated: boolean }>> {
  const m = await getMachine(db, actor, machineId);
  if (!m.ok) return m;
  const machine = m.value;
  if (!canActorEdit(actor, machine))
    return refuse(403, 'forbidden', 'Only the machine’s rider or a crew lead can log its oil changes.');
  const parsed = oilChangeInputSchema.safeParse(input);
  const repeat =
    parsed.success && parsed.data.clientKey ? await findRepeat(db, actor, machineId, parsed.data.clientKey) : null;
  if (repeat) return repeat;
  const fields: FieldErrors = parsed.success ? {} : refuseInvalid(parsed.error).fields;
  const grade = parseSaeGrade(String((input as Record<string, unknown> | null)?.['saeGrade'] ?? ''));
  if (!grade.ok) fields['saeGrade'] = grade.message;
  if (!parsed.success || !grade.ok) return refuse(400, 'invalid_input', 'Some fields need attention.', fields);
  const d = parsed.data;
  const crewId = actor.membership.crewId;
  const odometer = toStoredMeter(d.odometer, machine.meter);
  const absurd = explainAbsurdOdometer(odometer, machine.meter);
  if (absurd) return refuse(400, 'invalid_input', 'Some fields need attention.', { odometer: absurd });
  // Photos posted with the form count against the crew's storage quota like those sent by the uploader.
  const newBytes = (options.newPhotos ?? []).reduce((sum, p) => sum + p.byteSize, 0);
  const overQuota =
    newBytes > 0 ? checkCrewQuota(await sumCrewStorageBytes(db, crewId), newBytes, options.quotaBytes) : null;
  if (overQuota) return refuse(413, 'quota_exceeded', overQuota, { photos: overQuota });

  return db
    .transaction()
    .execute(async (trx) => {
      if (!d.meterReplaced) {
        const before = await findOilChangeBefore(trx, crewId, machineId, d.changedOn);
        if (before && odometer < before.odometer - 1e-9) {
          return refuse(400, 'invalid_input', 'Some fields need attention.', {
            odometer: `Lower than the reading at the oil change on ${formatDay(before.changed_on)} (${formatMeter(before.odometer, machine.meter)}). If the odometer or hour meter was replaced, tick “meter replaced”.`,
          });
        }
        const after = await findOilChangeAfter(trx, crewId, machineId, d.changedOn);
        if (after && !after.meter_replaced && odometer > after.odometer + 1e-9) {
          return refuse(400, 'invalid_input', 'Some fields need attention.', {
            odometer: `Higher than the reading at the later oil change on ${formatDay(after.changed_on)} (${formatMeter(after.odometer, machine.meter)}).`,
          });
        }
      }
      const row = await insertOilChange(trx, {
        crew_id: crewId,
        machine_id: machineId,
        changed_on: d.changedOn,
        odometer,
        meter_replaced: d.meterReplaced,
        oil_product: d.oilProduct,
        sae_grade: grade.grade,
        volume_l: d.volumeL ?? null,
        filter_changed: d.filterChanged,
        top_up_l: d.topUpL ?? 0,
        other_work: JSON.stringify(d.otherWork),
        notes: d.notes,
        created_by: actor.userId,
        client_key: d.clientKey ?? null,
      });
      const ids = [...new Set(d.photoIds)];
      const attached = await attachPhotos(trx, crewId, actor.userId, ids, row.id);
      if (attached !== ids.length) {
        // Throwing rolls the oil change back: a photo of someone else, or one already used, writes nothing.
        throw new PhotoAttachError();
      }
      for (const p of options.newPhotos ?? []) {
        if (!options.photoStore) throw new Error('photoStore is required to store photos.');
        await storeCheckedPhoto(trx, actor, p, options.photoStore, row.id);
      }
      return succeed({ ...toOilChange(row), repeated: false });
    })
    .catch(async (e: unknown) => {
      // Two sends of one queued oil change racing: the unique key decides, and the loser answers the winner.
      if ((e as { constraint?: string }).constraint === 'oil_changes_client_key_key' && d.clientKey) {
        const again = await findRepeat(db, actor, machineId, d.clientKey);
        if (again) return again;
      }
      if (e instanceof PhotoAttachError) {
        return refuse(400, 'invalid_input', 'Some fields need attention.', {
          photos: 'A photo could not be attached; upload it again.',
        });
      }
      throw e;
    });
}

class PhotoAttachError extends Error {}

/** The oil change an earlier send with this key created, or a refusal when the key belongs to another machine. */
async function findRepeat(db: Kysely<Database>, actor: Actor, machineId: string, clientKey: string) {
  const again = await findOilChangeByClientKey(db, actor.membership.crewId, clientKey);
  if (!again) return null;
  if (again.machine_id !== machineId)
    return refuse(409, 'client_key_reused', 'This key belongs to an oil change of another machine.');
  return succeed({ ...toOilChange(again), repeated: true });
}
