import type { Kysely, Transaction } from 'kysely';
import { createReadStream } from 'node:fs';
import { Readable } from 'node:stream';
import type { Database } from '../db/database';
import { canReadCrew } from '../auth/permissions';
import type { CrewMembership } from '../auth/types';
import type { Actor } from '~/lib/auth/types';
import { refuse, refuseNotFound, succeed, type Result } from '~/lib/http/result';
import type { PhotoRefusal, PreparedPhoto } from './photos';
import { findPhotoOfCrews, insertPhoto, type PhotoRow } from './photos.repository';
import { photoKey, type PhotoStore } from './photo-store';
import { stagePhoto } from './photo-intake';
import { bodyOf } from './photos.storage';
import { CREW_STORAGE_QUOTA_BYTES, checkCrewQuota } from '../storage-quota/storage-quota';
import { sumCrewStorageBytes } from '../storage-quota/storage-quota.repository';

type PhotoFields = Pick<PreparedPhoto, 'sha256' | 'contentType' | 'byteSize' | 'width' | 'height'>;

function insertPhotoRow(
  db: Kysely<Database> | Transaction<Database>,
  actor: Actor,
  photo: PhotoFields,
  oilChangeId: string | null,
  caption: string,
): Promise<PhotoRow> {
  return insertPhoto(db, {
    crew_id: actor.membership.crewId,
    oil_change_id: oilChangeId,
    sha256: photo.sha256,
    content_type: photo.contentType,
    byte_size: photo.byteSize,
    width: photo.width,
    height: photo.height,
    caption: caption.slice(0, 200),
    created_by: actor.userId,
  });
}

/** A checked photo ready to store: its facts and its bytes, in a temp file (an upload) or in memory. */
export type CheckedPhoto = PhotoFields & ({ tempPath: string } | { bytes: Uint8Array });

/**
 * Stores a checked photo (bytes by hash, then its row) in the actor's crew, optionally on an oil change. The
 * bytes are stored before the row: a failed store write leaves neither.
 */
export async function storeCheckedPhoto(
  db: Kysely<Database> | Transaction<Database>,
  actor: Actor,
  photo: CheckedPhoto,
  store: PhotoStore,
  oilChangeId: string | null = null,
  caption = '',
): Promise<PhotoRow> {
  const body = 'tempPath' in photo ? createReadStream(photo.tempPath) : bodyOf(photo.bytes);
  await store.put(photoKey(photo.sha256), body, photo.byteSize, photo.contentType);
  return insertPhotoRow(db, actor, photo, oilChangeId, caption);
}

function refusePhoto(r: PhotoRefusal) {
  return refuse(r.code === 'too_large' ? 413 : r.code === 'not_an_image' ? 415 : 400, r.code, r.message, {
    file: r.message,
  });
}

/**
 * Checks and stores one uploaded photo, not yet attached to an oil change (the form attaches it on save). The
 * bytes stream through a checked temp file into the store; the source is always read to its end.
 */
export async function uploadPhoto(
  db: Kysely<Database>,
  actor: Actor,
  source: Readable | Uint8Array,
  fileName: string,
  store: PhotoStore,
  quotaBytes = CREW_STORAGE_QUOTA_BYTES,
): Promise<Result<PhotoRow>> {
  const body = source instanceof Readable ? source : bodyOf(source);
  if (!canReadCrew(actor.membership) || actor.membership.role === 'mechanic') {
    body.resume();
    return refuse(403, 'forbidden', 'Your role in this crew does not add photos.');
  }
  const staged = await stagePhoto(body, fileName);
  if (!staged.ok) return refusePhoto(staged);
  const photo = staged.photo;
  try {
    const overQuota = checkCrewQuota(
      await sumCrewStorageBytes(db, actor.membership.crewId),
      photo.byteSize,
      quotaBytes,
    );
    if (overQuota) return refuse(413, 'quota_exceeded', overQuota, { file: overQuota });
    return succeed(await storeCheckedPhoto(db, actor, photo, store));
  } finally {
    await photo.discard();
  }
}

/** A photo for a member of its crew; any other asker gets "not found". */
export async function getPhotoForMember(
  db: Kysely<Database>,
  memberships: readonly CrewMembership[],
  id: string,
): Promise<Result<PhotoRow>> {
  const crews = memberships.filter((m) => canReadCrew(m)).map((m) => m.crewId);
  const row = await findPhotoOfCrews(db, crews, id);
  return row ? succeed(row) : refuseNotFound('photo');
}
