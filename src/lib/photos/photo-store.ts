import type { Readable } from 'node:stream';

// Where photo bytes live, behind one small interface: the disk of one machine, or any S3-API object store that
// several app machines share. Keys are content hashes (see photoKey), so a key can never be chosen by an
// uploader and the same picture is kept once.

/** A stored photo's bytes as a stream, with its length for the Content-Length header. */
export interface StoredPhoto {
  body: Readable;
  byteSize: number;
}

export interface PhotoStore {
  readonly kind: 'disk' | 's3';
  /**
   * Stores exactly `byteSize` bytes read from `body` under `key` (already checked: type sniffed, size capped,
   * hashed). Nothing is left under the key when it fails; a key already stored with that size is kept as is.
   */
  put(key: string, body: Readable, byteSize: number, contentType: string): Promise<void>;
  /** The photo's bytes as a stream, or null when nothing is stored under the key. */
  get(key: string): Promise<StoredPhoto | null>;
  /** True when something is stored under the key. */
  exists(key: string): Promise<boolean>;
  /** Removes the key; no error when it is not there. */
  delete(key: string): Promise<void>;
}

/** errno codes that mean "no room left" (disk or quota), as opposed to a store that cannot be written at all. */
const NO_ROOM = new Set(['ENOSPC', 'EDQUOT', 'EFBIG']);

/**
 * A photo could not be stored: `full` when the disk or quota has no room, `unavailable` when the store cannot
 * be written (a read-only or missing folder, an object store that does not answer). Nothing is left behind.
 */
export class PhotoStorageError extends Error {
  constructor(
    readonly reason: 'full' | 'unavailable',
    readonly errno: string,
  ) {
    super(
      reason === 'full'
        ? `The photo store has no room left (${errno}).`
        : `The photo store cannot be written (${errno}).`,
    );
    this.name = 'PhotoStorageError';
  }
}

/** A store error for any thrown value: errno codes of the file system, names of S3 errors, else "unavailable". */
export function toStorageError(error: unknown): PhotoStorageError {
  if (error instanceof PhotoStorageError) return error;
  const e = error as (NodeJS.ErrnoException & { name?: string }) | null;
  const code = typeof e?.code === 'string' ? e.code : typeof e?.name === 'string' ? e.name : 'unknown';
  return new PhotoStorageError(NO_ROOM.has(code) ? 'full' : 'unavailable', code);
}

/** The store key of a photo: its SHA-256, under a two-character prefix so no folder or listing grows huge. */
export function photoKey(sha256: string): string {
  if (!/^[0-9a-f]{64}$/.test(sha256)) throw new RangeError('Not a SHA-256 hex digest.');
  return `${sha256.slice(0, 2)}/${sha256}`;
}
