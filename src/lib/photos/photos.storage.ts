import { createReadStream } from 'node:fs';
import { mkdir, open, rename, stat, unlink } from 'node:fs/promises';
import { randomUUID } from 'node:crypto';
import path from 'node:path';
import { Readable } from 'node:stream';
import { photoKey, toStorageError, type PhotoStore, type StoredPhoto } from './photo-store';

// The disk store: photo files under UPLOAD_DIR named by their SHA-256. For one machine only; several app
// machines need the S3 store (photos.s3-storage.ts), or they would not see each other's photos.

export { PhotoStorageError } from './photo-store';

/** The file path of a stored photo. */
export function photoPath(uploadDir: string, sha256: string): string {
  return path.join(path.resolve(uploadDir), photoKey(sha256));
}

function keyPath(uploadDir: string, key: string): string {
  // Keys come from photoKey; anything else (a path with "..") is refused before it reaches the file system.
  if (!/^[0-9a-f]{2}\/[0-9a-f]{64}$/.test(key)) throw new RangeError('Not a photo key.');
  return path.join(path.resolve(uploadDir), key);
}

/** A photo store on the local disk under `uploadDir`. */
export function createDiskPhotoStore(uploadDir: string): PhotoStore {
  return {
    kind: 'disk',
    /**
     * Streams the bytes to a temp file, fsyncs and renames it, so a crash never leaves a half photo under its
     * hash; a write that fails (disk full, folder unusable) removes its temp file and throws a PhotoStorageError.
     */
    async put(key, body, byteSize) {
      const target = keyPath(uploadDir, key);
      try {
        if ((await stat(target)).size === byteSize) {
          // Content-addressed: the same bytes are already there.
          body.destroy();
          return;
        }
      } catch {
        // not there yet
      }
      const temp = `${target}.${randomUUID()}.part`;
      let created = false;
      try {
        await mkdir(path.dirname(target), { recursive: true });
        const handle = await open(temp, 'w', 0o640);
        created = true;
        try {
          for await (const chunk of body) await handle.write(chunk as Buffer);
          await handle.sync();
        } finally {
          await handle.close();
        }
        if ((await stat(temp)).size !== byteSize) throw Object.assign(new Error('short write'), { code: 'EIO' });
        await rename(temp, target);
      } catch (e) {
        body.destroy();
        // A half-written temp file would only use up the space that is already short.
        if (created) await unlink(temp).catch(() => {});
        throw toStorageError(e);
      }
    },
    async get(key): Promise<StoredPhoto | null> {
      const file = keyPath(uploadDir, key);
      try {
        const s = await stat(file);
        return { body: createReadStream(file), byteSize: s.size };
      } catch {
        return null;
      }
    },
    async exists(key) {
      return stat(keyPath(uploadDir, key)).then(
        () => true,
        () => false,
      );
    },
    async delete(key) {
      await unlink(keyPath(uploadDir, key)).catch((e: NodeJS.ErrnoException) => {
        if (e.code !== 'ENOENT') throw toStorageError(e);
      });
    },
  };
}

/** A stream over bytes already in memory (the oil-change form's photos, read with the form). */
export function bodyOf(bytes: Uint8Array): Readable {
  return Readable.from([Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)]);
}
