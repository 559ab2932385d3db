import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../db/database';
import { canReadCrew } from '../auth/permissions';
import type { CrewMembership } from '../auth/types';
import type { Actor } from '~/lib/auth/types';
import { refuse, refuseNotFound, succeed, type Result } from '~/lib/http/result';
import { preparePhoto, type PreparedPhoto } from './photos';
import { findPhotoOfCrews, insertPhoto, type PhotoRow } from './photos.repository';
import { writePhotoFile } from './photos.storage';
import { CREW_STORAGE_QUOTA_BYTES, checkCrewQuota } from '../storage-quota/storage-quota';
import { sumCrewStorageBytes } from '../storage-quota/storage-quota.repository';

/** Stores a checked photo (file by hash, then its row) in the actor's crew, optionally on an oil change. */
export async function storePreparedPhoto(
  db: Kysely<Database> | Transaction<Database>, actor: Actor, photo: PreparedPhoto, uploadDir: string, oilChangeId: string | null = null, caption = '',
): Promise<PhotoRow> {
  await writePhotoFile(uploadDir, photo.sha256, photo.bytes);
  return insertPhoto(db, {
    crew_id: actor.membership.crewId, oil_change_id: oilChangeId, sha256: photo.sha256, content_type: photo.contentType,
    byte_size: photo.byteSize, width: photo.width, height: photo.height, caption: caption.slice(0, 200), created_by: actor.userId,
  });
}

/** Checks and stores one uploaded photo, not yet attached to an oil change (the form attaches it on save). */
export async function uploadPhoto(
  db: Kysely<Database>, actor: Actor, bytes: Uint8Array, fileName: string, uploadDir: string, quotaBytes = CREW_STORAGE_QUOTA_BYTES,
): Promise<Result<PhotoRow>> {
  if (!canReadCrew(actor.membership) || actor.membership.role === 'mechanic') {
    return refuse(403, 'forbidden', 'Your role in this crew does not add photos.');
  }
  const checked = preparePhoto(bytes, fileName);
  if (!checked.ok) {
    return refuse(checked.code === 'too_large' ? 413 : checked.code === 'not_an_image' ? 415 : 400, checked.code, checked.message, { file: checked.message });
  }
  const overQuota = checkCrewQuota(await sumCrewStorageBytes(db, actor.membership.crewId), checked.photo.byteSize, quotaBytes);
  if (overQuota) return refuse(413, 'quota_exceeded', overQuota, { file: overQuota });
  return succeed(await storePreparedPhoto(db, actor, checked.photo, uploadDir));
}

/** A photo for a member of its crew; any other asker gets "not found". */
export async function getPhotoForMember(db: Kysely<Database>, memberships: readonly CrewMembership[], id: string): Promise<Result<PhotoRow>> {
  const crews = memberships.filter((m) => canReadCrew(m)).map((m) => m.crewId);
  const row = await findPhotoOfCrews(db, crews, id);
  return row ? succeed(row) : refuseNotFound('photo');
}
