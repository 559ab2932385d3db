/**
 * Spreadsheet formula injection: a cell that starts with = + - @ (or a tab or carriage return) can be
 * run as a formula when a CSV is opened in a spreadsheet (OWASP, "CSV Injection").
 */

/** Characters that make a spreadsheet treat a cell as a formula (OWASP CSV Injection), incl. full-width forms. */
const FORMULA_START = /^[=+\-@\t\r\uff1d\uff0b\uff0d\uff20]/;

/** A plain number such as -3 or +2.5 cannot execute; it is left alone so exported figures stay numbers. */
const PLAIN_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/** True when a text cell would be read as a formula by a spreadsheet (and is not a plain number). */
export function isFormulaLikeCell(cell: string): boolean {
  return FORMULA_START.test(cell) && !PLAIN_NUMBER.test(cell);
}

/** Make a text cell safe for CSV export: prefix a ' when a spreadsheet would run it as a formula. */
export function neutraliseCsvCell(cell: string): string {
  return isFormulaLikeCell(cell) ? `'${cell}` : cell;
}
