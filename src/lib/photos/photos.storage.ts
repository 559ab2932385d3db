import { mkdir, open, rename, stat, unlink } from 'node:fs/promises';
import { randomUUID } from 'node:crypto';
import path from 'node:path';

// Photo files live under UPLOAD_DIR named by their SHA-256: the same picture uploaded twice is stored once,
// and a name can never be chosen by the uploader.

/** The file path of a stored photo. */
export function photoPath(uploadDir: string, sha256: string): string {
  if (!/^[0-9a-f]{64}$/.test(sha256)) throw new RangeError('Not a SHA-256 hex digest.');
  return path.join(path.resolve(uploadDir), sha256.slice(0, 2), sha256);
}

/** Writes the bytes once (temp file, fsync, rename), so a crash never leaves a half photo under its hash. */
export async function writePhotoFile(uploadDir: string, sha256: string, bytes: Uint8Array): Promise<void> {
  const target = photoPath(uploadDir, sha256);
  try {
    if ((await stat(target)).size === bytes.byteLength) return;
  } catch {
    // not there yet
  }
  await mkdir(path.dirname(target), { recursive: true });
  const temp = `${target}.${randomUUID()}.part`;
  const handle = await open(temp, 'w', 0o640);
  try {
    await handle.writeFile(bytes);
    await handle.sync();
  } finally {
    await handle.close();
  }
  try {
    await rename(temp, target);
  } catch (e) {
    await unlink(temp).catch(() => {});
    throw e;
  }
}
