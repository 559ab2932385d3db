/**
 * Turn the bytes of an uploaded lab file into text, or say in plain words why it cannot be a lab CSV.
 * The CSV reader itself takes a string; this is the only place that looks at bytes.
 */

/** Largest lab file accepted: 5 MiB. A year of reports for a whole crew is a few hundred kB. */
export const MAX_LAB_FILE_BYTES = 5 * 1024 * 1024;

export type LabFileEncoding = 'utf-8' | 'utf-16le' | 'utf-16be' | 'windows-1252';

export type DecodeLabFileErrorCode = 'empty-file' | 'file-too-large' | 'image-file' | 'not-csv-file' | 'binary-file';

export interface DecodeLabFileError {
  code: DecodeLabFileErrorCode;
  message: string;
}

export type DecodeLabFileResult = { text: string; encoding: LabFileEncoding } | { error: DecodeLabFileError };

/** File signatures ("magic bytes") of things riders upload by mistake instead of a CSV. */
const SIGNATURES: ReadonlyArray<{ bytes: readonly number[]; code: DecodeLabFileErrorCode; what: string }> = [
  { bytes: [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a], code: 'image-file', what: 'a PNG image' },
  { bytes: [0xff, 0xd8, 0xff], code: 'image-file', what: 'a JPEG image (a photo)' },
  { bytes: [0x47, 0x49, 0x46, 0x38], code: 'image-file', what: 'a GIF image' },
  { bytes: [0x25, 0x50, 0x44, 0x46, 0x2d], code: 'not-csv-file', what: 'a PDF document' },
  // ZIP container: .xlsx and .ods spreadsheets are ZIP files.
  { bytes: [0x50, 0x4b, 0x03, 0x04], code: 'not-csv-file', what: 'a spreadsheet or ZIP archive' },
  // Compound File Binary: the old .xls format.
  {
    bytes: [0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1],
    code: 'not-csv-file',
    what: 'an old Excel (.xls) spreadsheet',
  },
];

function startsWith(bytes: Uint8Array, prefix: readonly number[]): boolean {
  if (bytes.length < prefix.length) return false;
  return prefix.every((b, i) => bytes[i] === b);
}

function fail(code: DecodeLabFileErrorCode, message: string): { error: DecodeLabFileError } {
  return { error: { code, message } };
}

/** True when the text holds control characters that never occur in a CSV (NUL aside, checked earlier). */
function hasBinaryControls(text: string): boolean {
  // Tab, LF, CR and form feed are text; the other C0 controls and DEL mean this is not a text file.
  // eslint-disable-next-line no-control-regex -- the control characters are what this pattern looks for
  return /[\u0001-\u0008\u000b\u000e-\u001a\u001c-\u001f\u007f]/.test(text);
}

/**
 * UTF-16 without a byte-order mark: ASCII text then has a NUL in every other byte, on the odd bytes
 * for little-endian and the even ones for big-endian. Judged on the first 512 bytes.
 */
function guessBomlessUtf16(bytes: Uint8Array): 'utf-16le' | 'utf-16be' | null {
  const n = Math.min(bytes.length, 512) & ~1;
  if (n < 4) return null;
  let evenNul = 0;
  let oddNul = 0;
  for (let i = 0; i < n; i += 2) {
    if (bytes[i] === 0) evenNul += 1;
    if (bytes[i + 1] === 0) oddNul += 1;
  }
  const pairs = n / 2;
  if (oddNul >= pairs * 0.9 && evenNul === 0) return 'utf-16le';
  if (evenNul >= pairs * 0.9 && oddNul === 0) return 'utf-16be';
  return null;
}

/** Decode an uploaded lab file: UTF-8 (with or without BOM), UTF-16 with BOM, else Windows-1252; rejects images and binaries. */
export function decodeLabFile(bytes: Uint8Array): DecodeLabFileResult {
  if (bytes.length > MAX_LAB_FILE_BYTES) {
    const mib = (bytes.length / (1024 * 1024)).toFixed(1);
    return fail(
      'file-too-large',
      `The file is ${mib} MiB; lab files up to 5 MiB are accepted. Split the report into smaller files.`,
    );
  }
  if (bytes.length === 0) {
    return fail('empty-file', 'The file is empty: it holds no header and no readings.');
  }
  for (const signature of SIGNATURES) {
    if (startsWith(bytes, signature.bytes)) {
      return fail(
        signature.code,
        `This file is ${signature.what}, not a CSV text file. Export the lab report as CSV and upload that.`,
      );
    }
  }

  let text: string;
  let encoding: LabFileEncoding;
  const bomlessUtf16 = guessBomlessUtf16(bytes);
  if (startsWith(bytes, [0xef, 0xbb, 0xbf])) {
    encoding = 'utf-8';
    try {
      text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(bytes);
    } catch {
      return fail(
        'binary-file',
        'The file starts like UTF-8 text but holds bytes that are not text. Export the lab report as CSV again.',
      );
    }
  } else if (startsWith(bytes, [0xff, 0xfe]) || startsWith(bytes, [0xfe, 0xff])) {
    encoding = bytes[0] === 0xff ? 'utf-16le' : 'utf-16be';
    // UTF-16 text has NUL bytes in it, so the NUL check below runs on the decoded text instead.
    text = new TextDecoder(encoding).decode(bytes);
  } else if (bomlessUtf16 !== null) {
    encoding = bomlessUtf16;
    text = new TextDecoder(encoding).decode(bytes);
  } else {
    if (bytes.includes(0)) {
      return fail(
        'binary-file',
        'The file holds NUL bytes, so it is a binary file, not a CSV text file. Export the lab report as CSV.',
      );
    }
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
      encoding = 'utf-8';
    } catch {
      // Not valid UTF-8: older lab software writes Windows-1252 (a superset of Latin-1 for printable
      // characters), where µ is 0xB5 and ° is 0xB0. Any byte sequence decodes, so this cannot fail.
      text = new TextDecoder('windows-1252').decode(bytes);
      encoding = 'windows-1252';
    }
  }
  if (text.includes('\u0000') || hasBinaryControls(text)) {
    return fail(
      'binary-file',
      'The file holds control bytes that never occur in a CSV, so it is a binary file. Export the lab report as CSV.',
    );
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  return { text, encoding };
}
