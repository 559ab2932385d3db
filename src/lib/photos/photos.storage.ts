import { mkdir, open, rename, stat, unlink } from 'node:fs/promises';
import { randomUUID } from 'node:crypto';
import path from 'node:path';

// Photo files live under UPLOAD_DIR named by their SHA-256: the same picture uploaded twice is stored once,
// and a name can never be chosen by the uploader.

/** errno codes that mean "no room left" (disk or quota), as opposed to a folder that cannot be written at all. */
const NO_ROOM = new Set(['ENOSPC', 'EDQUOT', 'EFBIG']);

/**
 * A photo could not be written to the upload folder: `full` when the disk or quota has no room, `unavailable`
 * when the folder cannot be created or written (read-only, missing, a file in its place). Nothing is left behind.
 */
export class PhotoStorageError extends Error {
  constructor(readonly reason: 'full' | 'unavailable', readonly errno: string) {
    super(reason === 'full' ? `The photo store has no room left (${errno}).` : `The photo store cannot be written (${errno}).`);
    this.name = 'PhotoStorageError';
  }
}

function toStorageError(error: unknown): unknown {
  const code = (error as NodeJS.ErrnoException | null)?.code;
  if (typeof code !== 'string') return error;
  return new PhotoStorageError(NO_ROOM.has(code) ? 'full' : 'unavailable', code);
}

/** The file path of a stored photo. */
export function photoPath(uploadDir: string, sha256: string): string {
  if (!/^[0-9a-f]{64}$/.test(sha256)) throw new RangeError('Not a SHA-256 hex digest.');
  return path.join(path.resolve(uploadDir), sha256.slice(0, 2), sha256);
}

/**
 * Writes the bytes once (temp file, fsync, rename), so a crash never leaves a half photo under its hash; a write
 * that fails (disk full, folder unusable) removes its temp file and throws a PhotoStorageError.
 */
export async function writePhotoFile(uploadDir: string, sha256: string, bytes: Uint8Array): Promise<void> {
  const target = photoPath(uploadDir, sha256);
  try {
    if ((await stat(target)).size === bytes.byteLength) return;
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
      await handle.writeFile(bytes);
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(temp, target);
  } catch (e) {
    // A half-written temp file would only use up the space that is already short.
    if (created) await unlink(temp).catch(() => {});
    throw toStorageError(e);
  }
}
