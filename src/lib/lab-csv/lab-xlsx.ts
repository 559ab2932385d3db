/**
 * Spreadsheet lab reports (.xlsx). A workbook is a ZIP archive of XML parts (ECMA-376, Office Open XML);
 * exceljs reads it. One sheet is chosen (the one a lab profile names, else the first with a recognisable
 * header) and turned into tab-separated text, one line per sheet row, so column recognition, preview,
 * profiles and confirm are those of a CSV and the preview's line numbers are the sheet's row numbers.
 * Cells are taken by their type: numbers as numbers, dates as ISO dates, booleans as yes/no. A formula
 * cell gives its cached result (what the lab's spreadsheet last computed); formulas are never evaluated.
 */
import { inflateRawSync } from 'node:zlib';
import type ExcelJS from 'exceljs';
import { recogniseHeader } from './column-recognition';
import { decodeLabFile, MAX_LAB_FILE_BYTES, type DecodeLabFileError } from './decode-lab-file';

/** Largest total size of a workbook's parts once unpacked: a 5 MiB lab sheet unpacks to a few tens of MiB. */
export const MAX_XLSX_UNPACKED_BYTES = 64 * 1024 * 1024;
/** Most parts a lab workbook plausibly has (a few sheets, styles, strings, themes). */
const MAX_XLSX_ENTRIES = 500;

export type ReadLabFileResult =
  { text: string; format: 'text' | 'xlsx'; sheet: string | null; sheets: string[] } | { error: DecodeLabFileError };

export const XLSX_CONTENT_TYPE = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';

const ZIP_LOCAL = 0x04034b50;
const ZIP_CENTRAL = 0x02014b50;
const ZIP_END = 0x06054b50;

function refuse(code: DecodeLabFileError['code'], message: string): { error: DecodeLabFileError } {
  return { error: { code, message } };
}

/** True when the bytes start like a ZIP archive (and so maybe an .xlsx workbook). */
export function looksLikeZip(bytes: Uint8Array): boolean {
  return bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04;
}

/**
 * Check a ZIP archive before anything unpacks it: it must be a workbook ([Content_Types].xml and
 * xl/workbook.xml), within the part and size limits, and each part must unpack to no more than the size its
 * directory entry declares (so a "zip bomb" that lies about its sizes is refused, not unpacked).
 */
export function checkWorkbookArchive(bytes: Uint8Array): string | null {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let end = -1;
  for (let i = bytes.length - 22; i >= Math.max(0, bytes.length - 22 - 65_535); i -= 1) {
    if (view.getUint32(i, true) === ZIP_END) {
      end = i;
      break;
    }
  }
  if (end === -1) return 'its ZIP directory is missing (a truncated or damaged file)';
  const entries = view.getUint16(end + 10, true);
  let at = view.getUint32(end + 16, true);
  if (entries > MAX_XLSX_ENTRIES) return `it holds ${entries} parts, more than any lab workbook`;
  const names = new Set<string>();
  let total = 0;
  for (let n = 0; n < entries; n += 1) {
    if (at + 46 > bytes.length || view.getUint32(at, true) !== ZIP_CENTRAL) return 'its ZIP directory is damaged';
    const method = view.getUint16(at + 10, true);
    const compressed = view.getUint32(at + 20, true);
    const declared = view.getUint32(at + 24, true);
    const nameLength = view.getUint16(at + 28, true);
    const extraLength = view.getUint16(at + 30, true);
    const commentLength = view.getUint16(at + 32, true);
    const localAt = view.getUint32(at + 42, true);
    const name = new TextDecoder().decode(bytes.subarray(at + 46, at + 46 + nameLength));
    names.add(name);
    if (compressed === 0xffffffff || declared === 0xffffffff) return 'it uses ZIP64 sizes, which no lab workbook needs';
    total += declared;
    if (total > MAX_XLSX_UNPACKED_BYTES)
      return `it unpacks to more than ${MAX_XLSX_UNPACKED_BYTES / (1024 * 1024)} MiB`;
    if (localAt + 30 > bytes.length || view.getUint32(localAt, true) !== ZIP_LOCAL)
      return 'its ZIP entries are damaged';
    const dataAt = localAt + 30 + view.getUint16(localAt + 26, true) + view.getUint16(localAt + 28, true);
    if (dataAt + compressed > bytes.length) return 'it is truncated';
    if (method === 8) {
      try {
        const out = inflateRawSync(bytes.subarray(dataAt, dataAt + compressed), {
          maxOutputLength: Math.max(1, declared),
        });
        if (out.byteLength !== declared) return `part "${name}" does not unpack to the size its directory states`;
      } catch {
        return `part "${name}" does not unpack to the size its directory states`;
      }
    } else if (method !== 0) {
      return `part "${name}" uses a compression method no spreadsheet writes`;
    }
    at += 46 + nameLength + extraLength + commentLength;
  }
  if (!names.has('[Content_Types].xml') || !names.has('xl/workbook.xml')) {
    return names.has('content.xml')
      ? 'it is an OpenDocument spreadsheet (.ods), not an .xlsx workbook'
      : 'it is a ZIP archive, not an .xlsx workbook';
  }
  return null;
}

/** Plain decimal text of a number as a spreadsheet shows it: 15 significant digits, no exponent. */
export function formatSheetNumber(value: number): string {
  if (!Number.isFinite(value)) return '#NUM!';
  const rounded = Number(value.toPrecision(15));
  const text = String(rounded);
  if (!/e/i.test(text)) return text;
  return rounded.toFixed(20).replace(/\.?0+$/, '');
}

type CellValue = ExcelJS.CellValue;

/** One cell as text, by its type (see the module doc). */
export function formatSheetCell(value: CellValue): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return formatSheetNumber(value);
  if (typeof value === 'string') return value;
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (value instanceof Date) return Number.isNaN(value.getTime()) ? '' : value.toISOString().slice(0, 10);
  if (typeof value === 'object') {
    if ('richText' in value && Array.isArray(value.richText)) return value.richText.map((r) => r.text).join('');
    if ('error' in value) return String(value.error);
    if ('formula' in value || 'sharedFormula' in value) {
      const result = (value as { result?: unknown }).result;
      // No cached result: the formula's text, which the reader reports as a formula it did not run.
      if (result === undefined || result === null)
        return `=${(value as { formula?: string }).formula ?? (value as { sharedFormula?: string }).sharedFormula ?? ''}`;
      if (typeof result === 'object' && result !== null && 'error' in result)
        return String((result as { error: unknown }).error);
      return formatSheetCell(result as CellValue);
    }
    if ('text' in value) return formatSheetCell((value as { text: CellValue }).text);
  }
  return '';
}

function tsvCell(text: string): string {
  // One sheet row stays one line, so line numbers in messages are row numbers.
  const flat = text.replace(/[\t\r\n]+/g, ' ');
  return flat.includes('"') ? `"${flat.replace(/"/g, '""')}"` : flat;
}

/** A sheet's rows as text cells, row 1 first; trailing empty rows dropped. */
export function readSheetCells(sheet: ExcelJS.Worksheet): string[][] {
  const width = sheet.columnCount;
  const rows: string[][] = [];
  for (let r = 1; r <= sheet.rowCount; r += 1) {
    // `values` is the row's sparse array from index 1: no cell objects are made for empty cells.
    const values = sheet.getRow(r).values as readonly CellValue[];
    const cells: string[] = [];
    for (let c = 1; c <= width; c += 1) cells.push(formatSheetCell(values[c] ?? null));
    rows.push(cells);
  }
  while (rows.length > 0 && rows[rows.length - 1]?.every((c) => c.trim() === '')) rows.pop();
  return rows;
}

/** True when one of a sheet's first rows reads as a lab header (two cells the recogniser knows, or a bottle column). */
export function hasRecognisableHeader(rows: readonly (readonly string[])[]): boolean {
  for (const row of rows.slice(0, 30)) {
    const kinds = row.filter((c) => c.trim() !== '').map((c) => recogniseHeader(c.trim()).kind);
    const known = kinds.filter((k) => k !== 'unknown').length;
    if (known >= 2 || (kinds.includes('bottle') && kinds.length >= 3)) return true;
  }
  return false;
}

/** Read an .xlsx workbook as tab-separated text of one sheet; see the module doc. */
export async function readXlsxLabFile(
  bytes: Uint8Array,
  options: { sheetNames?: readonly string[] } = {},
): Promise<ReadLabFileResult> {
  const problem = checkWorkbookArchive(bytes);
  if (problem)
    return refuse(
      'not-csv-file',
      `This file starts like a spreadsheet, but ${problem}. Save the lab report again as .xlsx or CSV and upload that.`,
    );
  // Loaded only when a workbook arrives: the reader is large, and a CSV upload should not wait for it.
  const { default: ExcelRuntime } = await import('exceljs');
  const workbook = new ExcelRuntime.Workbook();
  try {
    await workbook.xlsx.load(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength) as unknown as ArrayBuffer);
  } catch (error) {
    const why = error instanceof Error ? error.message.slice(0, 120) : 'unreadable';
    return refuse(
      'not-csv-file',
      `This spreadsheet could not be read (${why}). Save the lab report again as .xlsx or CSV and upload that.`,
    );
  }
  const sheets = workbook.worksheets;
  const names = sheets.map((s) => s.name);
  if (sheets.length === 0)
    return refuse('empty-file', 'The spreadsheet has no sheets, so it holds no header and no readings.');
  const named = (options.sheetNames ?? [])
    .map((n) => sheets.find((s) => s.name.trim().toLowerCase() === n.trim().toLowerCase()))
    .find((s) => s !== undefined);
  let chosen: { sheet: ExcelJS.Worksheet; rows: string[][] } | null = null;
  if (named) chosen = { sheet: named, rows: readSheetCells(named) };
  if (!chosen) {
    const visible = sheets.filter((s) => s.state !== 'hidden' && s.state !== 'veryHidden');
    let firstWithData: { sheet: ExcelJS.Worksheet; rows: string[][] } | null = null;
    for (const sheet of visible.length > 0 ? visible : sheets) {
      const rows = readSheetCells(sheet);
      if (rows.length === 0) continue;
      firstWithData ??= { sheet, rows };
      if (hasRecognisableHeader(rows)) {
        chosen = { sheet, rows };
        break;
      }
    }
    chosen ??= firstWithData;
  }
  if (!chosen || chosen.rows.length === 0)
    return refuse('empty-file', 'Every sheet of this spreadsheet is empty: it holds no header and no readings.');
  const text = chosen.rows.map((row) => row.map(tsvCell).join('\t')).join('\n');
  return { text: `${text}\n`, format: 'xlsx', sheet: chosen.sheet.name, sheets: names };
}

/**
 * Turn the bytes of a lab file into text, whatever it is: a CSV, TSV or text export (see decodeLabFile),
 * or an .xlsx workbook (recognised by content, never by name). Same size limit for both.
 */
export async function readLabFileBytes(
  bytes: Uint8Array,
  options: { sheetNames?: readonly string[] } = {},
): Promise<ReadLabFileResult> {
  if (bytes.length <= MAX_LAB_FILE_BYTES && looksLikeZip(bytes)) return readXlsxLabFile(bytes, options);
  const decoded = decodeLabFile(bytes);
  if ('error' in decoded) return decoded;
  return { text: decoded.text, format: 'text', sheet: null, sheets: [] };
}
