/**
 * Bottle codes. A lab kit's code is kept as printed; Sumpwise compares codes in a normal form (upper case,
 * spaces, dashes and other separators removed) so "ab-12 c" and "AB12C" are the same bottle: one normal form for
 * the forms, the lab file reader and the import.
 *
 * Codes Sumpwise issues use a 29-symbol alphabet in the spirit of Crockford's base32 without the symbols
 * people misread: no I, L, O, U (read as 1, 1, 0, V), no 0 or 1 (read as O and I/L), and no Z (read as 2).
 * The last symbol is a check character computed modulo the prime 29 with weights 2^k (k counted from the
 * right, the check itself having weight 1), the structure of ISO/IEC 7064's pure systems:
 * - a single wrong symbol changes the weighted sum by w·d with w ≠ 0 and 0 < |d| < 29, never a multiple
 *   of the prime 29, so it is caught;
 * - swapping neighbours a, b changes it by (w_k − w_{k+1})(b − a) = −2^k·(b − a) ≢ 0 (mod 29), caught too.
 * tests/unit/samples/bottle-code.test.ts checks both exhaustively.
 */
import { randomInt } from 'node:crypto';

export const CODE_ALPHABET = '23456789ABCDEFGHJKMNPQRSTVWXY';
const MODULUS = 29;
/** Data symbols in an issued code; with the check symbol an issued code has 7. */
export const ISSUED_DATA_LENGTH = 6;

/** Longest bottle-code text read; lab kit codes are under 20 characters (common practice, no published source). */
export const MAX_BOTTLE_CODE_TEXT = 64;

/**
 * Separators people and lab systems put inside a code: white space, hyphen-minus, underscore, full stop, slash,
 * middle dot, the Unicode hyphens and dashes (U+2010–U+2015) a spreadsheet's autocorrect writes, and the minus
 * sign (U+2212).
 */
const CODE_SEPARATORS = /[\s\-_./·\u2010-\u2015\u2212]+/g;

/** Upper case, with spaces, dashes and other separators removed: the form codes are compared in. */
export function normaliseBottleCode(code: string): string {
  // Only the head of an absurdly long entry is read, so a pasted 100 KB string costs no more than a real code.
  const head = code.length > MAX_BOTTLE_CODE_TEXT ? code.slice(0, MAX_BOTTLE_CODE_TEXT) : code;
  return head.toUpperCase().replace(CODE_SEPARATORS, '');
}

function valuesOf(symbols: string): number[] | null {
  const out: number[] = [];
  for (const ch of symbols) {
    const v = CODE_ALPHABET.indexOf(ch);
    if (v < 0) return null;
    out.push(v);
  }
  return out;
}

/** The check symbol for a string of alphabet symbols (throws on a symbol outside the alphabet). */
export function computeCheckSymbol(data: string): string {
  const values = valuesOf(data);
  if (!values) throw new RangeError(`“${data}” holds a symbol outside the code alphabet.`);
  // Horner's rule over weights 2^k: data symbol k places left of the check has weight 2^k.
  let sum = 0;
  for (const v of values) sum = ((sum + v) * 2) % MODULUS;
  return CODE_ALPHABET[(MODULUS - sum) % MODULUS]!;
}

/** True when a normalised code's last symbol is the right check symbol for the rest. */
export function hasValidCheckSymbol(normalised: string): boolean {
  if (normalised.length < 2) return false;
  const values = valuesOf(normalised);
  if (!values) return false;
  let sum = 0;
  for (const v of values) sum = (sum * 2 + v) % MODULUS;
  return sum === 0;
}

/** Why an issued code is not valid (or null when it is): wrong symbols, wrong length, or a failed check. */
export function explainIssuedCode(code: string): string | null {
  const n = normaliseBottleCode(code);
  if (n.length !== ISSUED_DATA_LENGTH + 1) {
    return `A Sumpwise bottle code has ${ISSUED_DATA_LENGTH + 1} characters; this one has ${n.length}.`;
  }
  const bad = [...n].filter((ch) => !CODE_ALPHABET.includes(ch));
  if (bad.length > 0) {
    return `A Sumpwise bottle code never contains ${[...new Set(bad)].join(', ')}; check the tag for a misread character.`;
  }
  if (!hasValidCheckSymbol(n)) {
    return 'This code fails its check character: one character is probably mistyped or two are swapped.';
  }
  return null;
}

/** A new random issued code in normal form (6 symbols + check), e.g. "K7MQ4XH". */
export function generateIssuedCode(random: (max: number) => number = randomInt): string {
  let data = '';
  for (let i = 0; i < ISSUED_DATA_LENGTH; i++) data += CODE_ALPHABET[random(CODE_ALPHABET.length)]!;
  return data + computeCheckSymbol(data);
}

/** An issued code grouped for reading aloud and writing on a bottle: "K7M-Q4XH". */
export function formatIssuedCode(normalised: string): string {
  return normalised.length === ISSUED_DATA_LENGTH + 1 ? `${normalised.slice(0, 3)}-${normalised.slice(3)}` : normalised;
}
