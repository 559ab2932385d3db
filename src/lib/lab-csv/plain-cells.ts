/**
 * The hot path of a big lab file: almost every cell is a plain number ("12", "0.5", "12,5" in a decimal-comma
 * file), a detection limit ("<1") or an ISO date. These checks read such cells character by character, with no
 * regular expression and no new string, and answer "not plain" (NaN or null) for everything else, which then
 * goes through the full readers in cell-values.ts. They never accept a cell the full reader would read
 * differently.
 */
import { isRealDate, type DecimalMark } from './cell-values';

/** Powers of ten that a double holds exactly (10^0 … 10^22, IEEE 754 binary64). */
const EXACT_POWERS_OF_TEN = Array.from({ length: 23 }, (_, i) => 10 ** i);

/** Digits a double holds exactly as an integer: 2^53 ≈ 9.007e15, so any 15-digit integer (IEEE 754 binary64). */
const MAX_EXACT_DIGITS = 15;

/** Digits and decimals of the last scanPlain, so that it returns without making an object. */
let scannedDigits = 0;
let scannedDecimals = 0;

/**
 * Read `cell` from `from` to `end` as digits, then optionally `mark` and at least one digit: the digits as one
 * integer (exact up to 15 of them), with their count and the count of decimals in scannedDigits and
 * scannedDecimals. -1 when the text is not of that form (blank, spaces, signs, exponents, grouping, qualifiers,
 * words).
 */
function scanPlain(cell: string, mark: DecimalMark, from: number, end: number): number {
  if (from >= end) return -1;
  const markCode = mark === '.' ? 46 : 44;
  let mantissa = 0;
  let digits = 0;
  let decimals = -1;
  for (let i = from; i < end; i += 1) {
    const c = cell.charCodeAt(i);
    if (c >= 48 && c <= 57) {
      mantissa = mantissa * 10 + (c - 48);
      digits += 1;
      if (decimals >= 0) decimals += 1;
    } else if (c === markCode && decimals === -1 && i > from && i < end - 1) {
      decimals = 0;
    } else {
      return -1;
    }
  }
  scannedDigits = digits;
  scannedDecimals = decimals > 0 ? decimals : 0;
  return mantissa;
}

/**
 * A plain unsigned number from `from` to `end` of `cell` (its end unless told): digits, then optionally `mark`
 * and at least one digit. Returns the same value as Number() on the cell written with a point, or NaN when the
 * cell is not of that form (blank, spaces, signs, exponents, grouping, qualifiers, words).
 *
 * With at most 15 digits the digits form an exact integer, and dividing it by an exact power of ten is one
 * correctly rounded operation, so the result is the double nearest the decimal, as Number() gives (Clinger's
 * fast path, "How to read floating point numbers accurately", 1990). Longer cells go to Number() itself.
 */
export function parsePlainNumber(cell: string, mark: DecimalMark, from = 0, end = cell.length): number {
  const mantissa = scanPlain(cell, mark, from, end);
  if (mantissa === -1) return Number.NaN;
  if (scannedDigits > MAX_EXACT_DIGITS) {
    const text = from === 0 && end === cell.length ? cell : cell.slice(from, end);
    return Number(mark === '.' ? text : text.replace(',', '.'));
  }
  return scannedDecimals > 0 ? mantissa / EXACT_POWERS_OF_TEN[scannedDecimals]! : mantissa;
}

/** Largest digits-as-integer a plain-number key holds, so that key × 4 stays a small integer (V8's Smi, 2^30). */
const MAX_KEY_MANTISSA = 2 ** 24;

/**
 * The same cells as parsePlainNumber, answered as a small integer key instead of a number: the digits read as an
 * integer times 16, plus the count of decimals. Equal keys mean equal values, and no floating-point number is made
 * (a fractional double is a fresh heap object in V8, and 270,000 of them are garbage). -1 when the cell is not plain
 * or its digits are too many for a key; parsePlainNumber then reads it.
 */
export function plainNumberKey(cell: string, mark: DecimalMark, from = 0, end = cell.length): number {
  const mantissa = scanPlain(cell, mark, from, end);
  // Past these, parsePlainNumber hands the cell to Number(), or the key would leave the small integers.
  if (mantissa === -1 || mantissa >= MAX_KEY_MANTISSA || scannedDigits > MAX_EXACT_DIGITS) return -1;
  return mantissa * 16 + scannedDecimals;
}

/** The value of a plainNumberKey: exactly what parsePlainNumber gives for the same cell. */
export function plainKeyValue(key: number): number {
  const decimals = key % 16;
  const mantissa = (key - decimals) / 16;
  return decimals > 0 ? mantissa / EXACT_POWERS_OF_TEN[decimals]! : mantissa;
}

/** "ND" or "nd" alone: not detected, without a limit (read as 0 with qualifier "<", like the full reader). */
export function isBareNotDetected(cell: string, from = 0, end = cell.length): boolean {
  return end - from === 2 && (cell.charCodeAt(from) | 32) === 110 && (cell.charCodeAt(from + 1) | 32) === 100;
}

function twoDigits(cell: string, at: number): number {
  const a = cell.charCodeAt(at) - 48;
  const b = cell.charCodeAt(at + 1) - 48;
  return a >= 0 && a <= 9 && b >= 0 && b <= 9 ? a * 10 + b : -1;
}

/**
 * A cell that is exactly an ISO calendar day, yyyy-mm-dd, naming a real day: returned as it is (it is already
 * the stored form). Anything else, including the same date with spaces, a time or slashes, is null and goes
 * through the full date reader.
 */
export function readIsoDay(cell: string): string | null {
  if (cell.length !== 10 || cell.charCodeAt(4) !== 45 || cell.charCodeAt(7) !== 45) return null;
  const century = twoDigits(cell, 0);
  const yy = twoDigits(cell, 2);
  const month = twoDigits(cell, 5);
  const day = twoDigits(cell, 8);
  if (century < 0 || yy < 0 || month < 0 || day < 0) return null;
  return isRealDate(century * 100 + yy, month, day) ? cell : null;
}
