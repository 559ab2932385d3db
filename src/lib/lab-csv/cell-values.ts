/**
 * Reading single cells of a lab CSV: numbers with detection-limit qualifiers, glycol results and dates.
 * Each function takes the raw cell and returns a value or the reason it cannot be read; the caller
 * turns reasons into messages that name the row and column.
 */
import { isFormulaLikeCell } from './csv-cell';

export type DecimalMark = '.' | ',';
export type Qualifier = '<' | '>';

export type CellProblem = 'not-a-number' | 'unclear-number' | 'negative-value' | 'formula-like-cell';

export type ReadingParse =
  | { status: 'missing' }
  | { status: 'ok'; value: number; qualifier?: Qualifier; belowDetection?: boolean }
  | { status: 'problem'; problem: CellProblem; detail: string };

/** Cells that mean "no result" rather than a value (common practice, no published source). */
const MISSING_MARKERS = new Set(['', '-', '--', '–', '—', 'n/a', 'na', 'n.a.', 'not tested', 'not run']);

/** "Not detected" markers, optionally followed by the limit: "ND", "n.d.", "ND (<1)", "BDL 0.5". */
// Each quantified part is fenced by a literal or a class the next part cannot match, so matching is linear.
const NOT_DETECTED =
  /^(?:nd|n\.d\.?|not detected|bdl|below detection(?: limit)?)(?:\s*(?:\(\s*)?(?:<\s*)?([^()<\s](?:[^()\s]|\s+[^()\s])*)\s*\)?)?$/;

/** Longest cell read as a value; a lab's longest real cell ("below detection limit (<0.5)") is under 40. */
export const MAX_CELL_TEXT = 64;

const PLAIN_POINT = /^\d+(?:\.\d+)?$/;
const PLAIN_COMMA = /^\d+(?:,\d+)?$/;

function tidy(cell: string): string {
  // Non-breaking and narrow spaces are common in exported numbers ("1 234").
  return cell.replace(/[\u00a0\u202f\u2009]/g, ' ').trim();
}

/** Parse an unsigned number written with `mark` as decimal mark; grouping separators are the other mark or a space. */
function parseUnsigned(s: string, mark: DecimalMark): number | CellProblem {
  if (mark === '.') {
    if (/^\d{1,3}(?:,\d{3})+(?:\.\d+)?$/.test(s)) return Number(s.replace(/,/g, ''));
    if (/^\d{1,3}(?: \d{3})+(?:\.\d+)?$/.test(s)) return Number(s.replace(/ /g, ''));
    if (/^(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/.test(s)) return Number(s);
    if (/\d,\d/.test(s)) return 'unclear-number';
    return 'not-a-number';
  }
  if (/^\d{1,3}(?:\.\d{3})+(?:,\d+)?$/.test(s)) return Number(s.replace(/\./g, '').replace(',', '.'));
  if (/^\d{1,3}(?: \d{3})+(?:,\d+)?$/.test(s)) return Number(s.replace(/ /g, '').replace(',', '.'));
  if (/^(?:\d+(?:,\d*)?|,\d+)(?:[eE][+-]?\d+)?$/.test(s)) return Number(s.replace(',', '.'));
  if (/\d\.\d/.test(s)) return 'unclear-number';
  return 'not-a-number';
}

/** Read a numeric reading cell: "12", "12,5", "1.234,5", "<1", ">1000", "ND", "ND (<0.5)"; blank is missing. */
export function parseReadingCell(cell: string, mark: DecimalMark): ReadingParse {
  // Fast path first: almost every cell of a real report is a plain number.
  if (mark === '.' ? PLAIN_POINT.test(cell) : PLAIN_COMMA.test(cell)) {
    return { status: 'ok', value: Number(mark === '.' ? cell : cell.replace(',', '.')) };
  }
  if (cell.length > MAX_CELL_TEXT)
    return { status: 'problem', problem: 'not-a-number', detail: `${cell.slice(0, 24)}…` };
  const s = tidy(cell);
  const lower = s.toLowerCase();
  if (MISSING_MARKERS.has(lower)) return { status: 'missing' };
  const nd = NOT_DETECTED.exec(lower);
  if (nd) {
    if (nd[1] === undefined) return { status: 'ok', value: 0, qualifier: '<', belowDetection: true };
    const limit = parseUnsigned(nd[1], mark);
    if (typeof limit === 'number') return { status: 'ok', value: limit, qualifier: '<', belowDetection: true };
    return { status: 'problem', problem: limit, detail: s };
  }
  const qualified = /^(<=?|>=?|≤|≥)\s*([^]*)$/.exec(s);
  let qualifier: Qualifier | undefined;
  let body = s;
  if (qualified?.[1] !== undefined && qualified[2] !== undefined) {
    qualifier = qualified[1].startsWith('<') || qualified[1] === '≤' ? '<' : '>';
    body = qualified[2];
  }
  if (isFormulaLikeCell(body)) return { status: 'problem', problem: 'formula-like-cell', detail: s };
  let negative = false;
  if (body.startsWith('-') || body.startsWith('−')) {
    negative = true;
    body = body.slice(1).trim();
  } else if (body.startsWith('+')) {
    body = body.slice(1).trim();
  }
  const value = parseUnsigned(body, mark);
  if (typeof value !== 'number') return { status: 'problem', problem: value, detail: s };
  if (!Number.isFinite(value)) return { status: 'problem', problem: 'not-a-number', detail: s };
  if (negative && value !== 0) return { status: 'problem', problem: 'negative-value', detail: s };
  return qualifier === undefined ? { status: 'ok', value } : { status: 'ok', value, qualifier };
}

const GLYCOL_POSITIVE = new Set(['positive', 'pos', 'pos.', 'yes', 'y', 'detected', 'present', '+', '1', 'true']);
const GLYCOL_NEGATIVE = new Set([
  'negative',
  'neg',
  'neg.',
  'no',
  'n',
  'not detected',
  'nd',
  'n.d.',
  'n.d',
  'absent',
  'none',
  '0',
  'false',
]);

/** Read a glycol (coolant) result: positive/negative/yes/no (and 1/0) → 1/0; blank is missing. */
export function parseGlycolCell(cell: string): ReadingParse {
  if (cell.length > MAX_CELL_TEXT)
    return { status: 'problem', problem: 'not-a-number', detail: `${cell.slice(0, 24)}…` };
  const s = tidy(cell).toLowerCase();
  if (GLYCOL_POSITIVE.has(s)) return { status: 'ok', value: 1 };
  if (GLYCOL_NEGATIVE.has(s)) return { status: 'ok', value: 0 };
  if (MISSING_MARKERS.has(s)) return { status: 'missing' };
  if (isFormulaLikeCell(s)) return { status: 'problem', problem: 'formula-like-cell', detail: tidy(cell) };
  return { status: 'problem', problem: 'not-a-number', detail: tidy(cell) };
}

export type DateOrder = 'dmy' | 'mdy';

/** A date cell as found, before the column's day/month order is settled. */
export type DateCell =
  | { kind: 'missing' }
  | { kind: 'exact'; year: number; month: number; day: number }
  /** Day and month as two numbers whose order is not known from the cell alone ("03/04/2026"). */
  | { kind: 'numeric'; first: number; second: number; year: number; dotted: boolean }
  | { kind: 'problem'; problem: 'invalid-date' | 'formula-like-cell'; detail: string };

const MONTHS: Readonly<Record<string, number>> = {
  jan: 1,
  feb: 2,
  mar: 3,
  apr: 4,
  may: 5,
  jun: 6,
  jul: 7,
  aug: 8,
  sep: 9,
  sept: 9,
  oct: 10,
  nov: 11,
  dec: 12,
  january: 1,
  february: 2,
  march: 3,
  april: 4,
  june: 6,
  july: 7,
  august: 8,
  september: 9,
  october: 10,
  november: 11,
  december: 12,
};

function expandYear(year: string): number {
  // Two-digit years are read as 20yy: lab reports for a product launched in this century.
  return year.length === 2 ? 2000 + Number(year) : Number(year);
}

/** True when year-month-day names a real calendar day. */
export function isRealDate(year: number, month: number, day: number): boolean {
  if (month < 1 || month > 12 || day < 1 || year < 1900 || year > 2999) return false;
  // Gregorian calendar: February has 29 days in years divisible by 4, except centuries not divisible by 400.
  const leap = year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0);
  const daysInMonth =
    month === 2 ? (leap ? 29 : 28) : month === 4 || month === 6 || month === 9 || month === 11 ? 30 : 31;
  return day <= daysInMonth;
}

/** Format a calendar day as ISO 8601 yyyy-mm-dd. */
export function formatIsoDate(year: number, month: number, day: number): string {
  return `${String(year).padStart(4, '0')}-${String(month).padStart(2, '0')}-${String(day).padStart(2, '0')}`;
}

/** Read a date cell: ISO (2026-04-03, time ignored), d/m/y or m/d/y with / . - (order settled per column), or "3 Apr 2026". */
export function parseDateCell(cell: string): DateCell {
  if (cell.length > MAX_CELL_TEXT) return { kind: 'problem', problem: 'invalid-date', detail: `${cell.slice(0, 24)}…` };
  const s = tidy(cell);
  if (MISSING_MARKERS.has(s.toLowerCase())) return { kind: 'missing' };
  const bad = (): DateCell => ({ kind: 'problem', problem: 'invalid-date', detail: s });
  const iso = /^(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})(?:[T ][\d:.]+(?:Z|[+-]\d{2}:?\d{2})?)?$/.exec(s);
  if (iso?.[1] !== undefined && iso[2] !== undefined && iso[3] !== undefined) {
    const [year, month, day] = [Number(iso[1]), Number(iso[2]), Number(iso[3])];
    return isRealDate(year, month, day) ? { kind: 'exact', year, month, day } : bad();
  }
  const numeric = /^(\d{1,2})([/.-])(\d{1,2})\2(\d{4}|\d{2})(?:[T ][\d:.]+)?$/.exec(s);
  if (numeric?.[1] !== undefined && numeric[3] !== undefined && numeric[4] !== undefined) {
    const first = Number(numeric[1]);
    const second = Number(numeric[3]);
    const year = expandYear(numeric[4]);
    const dotted = numeric[2] === '.';
    if (!isRealDate(year, first, second) && !isRealDate(year, second, first)) return bad();
    return { kind: 'numeric', first, second, year, dotted };
  }
  const dayFirst = /^(\d{1,2})[\s/.-]+([a-z]{3,9})\.?[\s/.,-]+(\d{4}|\d{2})$/i.exec(s);
  const monthFirst = /^([a-z]{3,9})\.?[\s/-]+(\d{1,2})(?:st|nd|rd|th)?,?[\s/-]+(\d{4})$/i.exec(s);
  const parts = dayFirst
    ? { day: dayFirst[1], month: dayFirst[2], year: dayFirst[3] }
    : monthFirst
      ? { day: monthFirst[2], month: monthFirst[1], year: monthFirst[3] }
      : null;
  if (parts?.day !== undefined && parts.month !== undefined && parts.year !== undefined) {
    const month = MONTHS[parts.month.toLowerCase()];
    const year = expandYear(parts.year);
    const day = Number(parts.day);
    if (month === undefined || !isRealDate(year, month, day)) return bad();
    return { kind: 'exact', year, month, day };
  }
  if (isFormulaLikeCell(s)) return { kind: 'problem', problem: 'formula-like-cell', detail: s };
  return bad();
}

/** What one numeric date cell says about its column's order on its own, if anything. */
export function evidenceOfDateOrder(cell: { first: number; second: number; dotted: boolean }): DateOrder | null {
  // A dotted date (03.04.2026) is written day first (common practice, no published source).
  if (cell.dotted) return 'dmy';
  if (cell.first > 12 && cell.second <= 12) return 'dmy';
  if (cell.second > 12 && cell.first <= 12) return 'mdy';
  return null;
}
