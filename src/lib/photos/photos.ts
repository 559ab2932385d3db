import { createHash } from 'node:crypto';

/** Largest photo accepted, in bytes (10 MB: a phone's full-size JPEG fits with room). */
export const PHOTO_MAX_BYTES = 10 * 1024 * 1024;

export type ImageType = 'image/jpeg' | 'image/png' | 'image/gif' | 'image/webp' | 'image/heic' | 'image/avif';

/**
 * The image type from the file's first bytes (its magic number), never from its name or the browser's
 * claim. Signatures: JPEG FF D8 FF; PNG 89 50 4E 47 0D 0A 1A 0A; GIF "GIF87a"/"GIF89a"; WebP "RIFF"…"WEBP";
 * HEIC/AVIF an ISO-BMFF "ftyp" box at byte 4 with brand heic/heix/mif1/avif (from memory of the formats'
 * specifications: JFIF, PNG (ISO/IEC 15948), GIF89a, RIFF/WebP, ISO/IEC 14496-12).
 */
export function sniffImageType(bytes: Uint8Array): ImageType | null {
  const b = bytes;
  const ascii = (from: number, to: number) => String.fromCharCode(...b.subarray(from, to));
  if (b.length >= 3 && b[0] === 0xff && b[1] === 0xd8 && b[2] === 0xff) return 'image/jpeg';
  if (b.length >= 8 && [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a].every((v, i) => b[i] === v)) return 'image/png';
  if (b.length >= 6 && (ascii(0, 6) === 'GIF87a' || ascii(0, 6) === 'GIF89a')) return 'image/gif';
  if (b.length >= 12 && ascii(0, 4) === 'RIFF' && ascii(8, 12) === 'WEBP') return 'image/webp';
  if (b.length >= 12 && ascii(4, 8) === 'ftyp') {
    const brand = ascii(8, 12);
    if (brand === 'avif' || brand === 'avis') return 'image/avif';
    if (['heic', 'heix', 'heim', 'heis', 'mif1', 'msf1'].includes(brand)) return 'image/heic';
  }
  return null;
}

/** Pixel size from the header of a PNG, GIF, JPEG or WebP; null when it cannot be read cheaply. */
export function readImageSize(bytes: Uint8Array, type: ImageType): { width: number; height: number } | null {
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  try {
    if (type === 'image/png') return { width: v.getUint32(16), height: v.getUint32(20) };
    if (type === 'image/gif') return { width: v.getUint16(6, true), height: v.getUint16(8, true) };
    if (type === 'image/webp') {
      const chunk = String.fromCharCode(...bytes.subarray(12, 16));
      if (chunk === 'VP8X')
        return { width: 1 + (v.getUint32(24, true) & 0xffffff), height: 1 + (v.getUint32(27, true) & 0xffffff) };
      if (chunk === 'VP8 ') return { width: v.getUint16(26, true) & 0x3fff, height: v.getUint16(28, true) & 0x3fff };
      if (chunk === 'VP8L') {
        const bits = v.getUint32(21, true);
        return { width: (bits & 0x3fff) + 1, height: ((bits >> 14) & 0x3fff) + 1 };
      }
      return null;
    }
    if (type === 'image/jpeg') {
      // Walk the segments to the first start-of-frame marker (SOF0…SOF15 except DHT, JPG, DAC).
      let i = 2;
      while (i + 9 < bytes.length) {
        if (bytes[i] !== 0xff) return null;
        const marker = bytes[i + 1]!;
        const len = v.getUint16(i + 2);
        if (marker >= 0xc0 && marker <= 0xcf && ![0xc4, 0xc8, 0xcc].includes(marker)) {
          return { height: v.getUint16(i + 5), width: v.getUint16(i + 7) };
        }
        i += 2 + len;
      }
    }
  } catch {
    return null;
  }
  return null;
}

/** A photo checked and ready to store: its type, size and content hash. */
export interface PreparedPhoto {
  bytes: Uint8Array;
  sha256: string;
  contentType: ImageType;
  byteSize: number;
  width: number | null;
  height: number | null;
}

export type PhotoRefusal = { ok: false; code: 'too_large' | 'not_an_image' | 'empty'; message: string };
export type PhotoCheck = { ok: true; photo: PreparedPhoto } | PhotoRefusal;

/** What the checks read from a photo: its real type and, when the header says so cheaply, its pixel size. */
export interface PhotoFacts {
  contentType: ImageType;
  width: number | null;
  height: number | null;
}

/** Bytes from the start of a file that the checks need: the type signature and the header with the pixel size. */
export const PHOTO_HEAD_BYTES = 256 * 1024;

/**
 * Checks a photo's size and real type from its first bytes (`head`, at least the first PHOTO_HEAD_BYTES or the
 * whole file) and its full length; says in plain words why a file is refused.
 */
export function checkPhoto(
  head: Uint8Array,
  byteSize: number,
  fileName = 'the file',
): ({ ok: true } & PhotoFacts) | PhotoRefusal {
  if (byteSize === 0) return { ok: false, code: 'empty', message: `${fileName} is empty.` };
  if (byteSize > PHOTO_MAX_BYTES) {
    return {
      ok: false,
      code: 'too_large',
      message: `${fileName} is ${(byteSize / 1048576).toFixed(1)} MB; photos can be at most 10 MB each.`,
    };
  }
  const type = sniffImageType(head);
  if (!type) {
    return {
      ok: false,
      code: 'not_an_image',
      message: `${fileName} is not a photo (JPEG, PNG, WebP, GIF, HEIC or AVIF), whatever its name says.`,
    };
  }
  const size = readImageSize(head, type);
  return { ok: true, contentType: type, width: size?.width ?? null, height: size?.height ?? null };
}

/** Checks an upload held in memory and hashes it (the oil-change form's photos). */
export function preparePhoto(bytes: Uint8Array, fileName = 'the file'): PhotoCheck {
  const c = checkPhoto(bytes, bytes.byteLength, fileName);
  if (!c.ok) return c;
  return {
    ok: true,
    photo: {
      bytes,
      sha256: createHash('sha256').update(bytes).digest('hex'),
      contentType: c.contentType,
      byteSize: bytes.byteLength,
      width: c.width,
      height: c.height,
    },
  };
}
