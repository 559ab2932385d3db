import { createHash, randomUUID } from 'node:crypto';
import { open, unlink } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { checkPhoto, PHOTO_HEAD_BYTES, PHOTO_MAX_BYTES, type PhotoFacts, type PhotoRefusal } from './photos';
import { toStorageError } from './photo-store';

// An upload is read once, as it arrives: each chunk is hashed, counted and written to a private temp file, and
// only the first bytes are kept in memory for the type check. The temp file is what the store then receives
// with its length known, so no photo is ever held whole in memory, and a refused file reaches no store.

/** A photo received into a temp file and checked; `discard()` removes the temp file (always call it). */
export interface StagedPhoto extends PhotoFacts {
  tempPath: string;
  sha256: string;
  byteSize: number;
  discard(): Promise<void>;
}

export type StageResult = { ok: true; photo: StagedPhoto } | (PhotoRefusal & { byteSize: number });

/** Bytes read before the type is judged; every signature sniffImageType knows fits in the first 12. */
const SNIFF_BYTES = 64;

/**
 * Reads `source` to its end into a temp file under `tempDir`, hashing and counting as it goes. Past the size
 * cap, or once the first bytes show it is not a photo, nothing more is written (the rest is read and dropped,
 * so the client gets its answer) and the temp file is removed; the refusal says why.
 */
export async function stagePhoto(source: Readable, fileName: string, tempDir = os.tmpdir()): Promise<StageResult> {
  const tempPath = path.join(tempDir, `sumpwise-photo-${randomUUID()}.part`);
  const hash = createHash('sha256');
  const head: Buffer[] = [];
  let headBytes = 0;
  let byteSize = 0;
  let refused: PhotoRefusal | null = null;
  let handle: Awaited<ReturnType<typeof open>> | undefined;
  const remove = async () => {
    await unlink(tempPath).catch(() => {});
  };
  try {
    try {
      handle = await open(tempPath, 'wx', 0o600);
    } catch (error) {
      source.resume();
      throw toStorageError(error);
    }
    for await (const raw of source) {
      const chunk = Buffer.isBuffer(raw) ? raw : Buffer.from(raw as Uint8Array);
      byteSize += chunk.byteLength;
      if (refused) continue;
      if (byteSize > PHOTO_MAX_BYTES) {
        refused = { ok: false, code: 'too_large', message: '' };
        continue;
      }
      if (headBytes < PHOTO_HEAD_BYTES) {
        head.push(chunk.subarray(0, PHOTO_HEAD_BYTES - headBytes));
        headBytes += Math.min(chunk.byteLength, PHOTO_HEAD_BYTES - headBytes);
        if (headBytes >= SNIFF_BYTES && headBytes - chunk.byteLength < SNIFF_BYTES) {
          const early = checkPhoto(Buffer.concat(head), headBytes, fileName);
          if (!early.ok && early.code === 'not_an_image') {
            refused = early;
            continue;
          }
        }
      }
      hash.update(chunk);
      try {
        await handle.write(chunk);
      } catch (error) {
        throw toStorageError(error);
      }
    }
    await handle.close();
    handle = undefined;
    // The full length is known now: the final check gives the same words as for a photo held in memory.
    const c = checkPhoto(Buffer.concat(head), byteSize, fileName);
    if (!c.ok) {
      await remove();
      return { ...c, byteSize };
    }
    if (refused) {
      await remove();
      return { ...refused, byteSize };
    }
    return {
      ok: true,
      photo: {
        contentType: c.contentType,
        width: c.width,
        height: c.height,
        tempPath,
        sha256: hash.digest('hex'),
        byteSize,
        discard: remove,
      },
    };
  } catch (error) {
    await handle?.close().catch(() => {});
    await remove();
    throw error;
  }
}
