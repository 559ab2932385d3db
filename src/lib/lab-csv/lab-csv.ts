/**
 * The lab CSV reader: text in, recognised columns, rows keyed by bottle code, and every problem worded
 * for a rider with the line and column it sits in. Pure: no database, no I/O. The importer decides
 * what to write; this module only reads.
 */
import { MAX_BOTTLE_CODE_TEXT, normaliseBottleCode } from '../samples/bottle-code';
import { ELEMENT_CODES, isMeasurandCode, type MeasurandCode } from '../analysis/measurands';
import {
  evidenceOfDateOrder,
  formatIsoDate,
  isRealDate,
  parseDateCell,
  parseGlycolCell,
  parseReadingCell,
  type DateCell,
  type DateOrder,
  type DecimalMark,
  type Qualifier,
  type ReadingParse,
} from './cell-values';
import {
  isUnitCell,
  recogniseHeader,
  type ColumnKind,
  type LabUnit,
  type RecognisedHeader,
} from './column-recognition';
import { isFormulaLikeCell } from './csv-cell';
import { arrayGrid, readCsvGrid, type CsvGrid, type CsvSplitter, type RowView } from './csv-grid';
import { isBareNotDetected, parsePlainNumber, plainKeyValue, plainNumberKey, readIsoDay } from './plain-cells';
import {
  DAY_FIRST_LANGUAGES,
  detectHeaderLanguages,
  HEADER_LANGUAGES,
  parseLocalMonthDate,
  readLocalGlycolWord,
} from './header-dictionary';
import { detectLongFormat, pivotLongFormat, rewordPivotIssues, type PivotResult } from './long-format';
import { findPageFurniture, PageFurnitureScanner } from './page-furniture';
import { convertSayboltToKinematic } from './saybolt';

export { decodeLabFile, MAX_LAB_FILE_BYTES } from './decode-lab-file';
export { neutraliseCsvCell } from './csv-cell';
export type { ColumnKind, LabUnit } from './column-recognition';
export type { DateOrder, DecimalMark, Qualifier } from './cell-values';

export interface LabReading {
  value: number;
  qualifier?: Qualifier;
}

export type LabReadings = Partial<Record<MeasurandCode, LabReading>>;

export interface LabCsvRow {
  /** 1-based line of the file where the row starts. */
  line: number;
  bottle: { raw: string; normalised: string };
  /** ISO yyyy-mm-dd. */
  sampled?: string;
  reported?: string;
  readings: LabReadings;
  /** Cells of unrecognised columns, by header, kept as text so nothing is dropped silently. */
  other: Record<string, string>;
}

export type LabCsvConversion = 'SUS210→KV100' | '%→ppm' | 'ppm→%' | '°F→°C';

export interface LabCsvColumn {
  /** 0-based position in the file. */
  index: number;
  header: string;
  kind: ColumnKind;
  code?: MeasurandCode;
  unit?: LabUnit;
  conversion?: LabCsvConversion;
  /** Why the column is unknown or ignored, when there is more to say than "not recognised". */
  note?: string;
}

export type LabCsvIssueCode =
  | 'empty-file'
  | 'no-data-rows'
  | 'no-bottle-column'
  | 'duplicate-column'
  | 'unknown-column'
  | 'ragged-row'
  | 'malformed-csv'
  | 'missing-bottle-code'
  | 'bottle-code-too-long'
  | 'duplicate-bottle-code'
  | 'formula-like-cell'
  | 'negative-value'
  | 'not-a-number'
  | 'unclear-number'
  | 'impossible-value'
  | 'out-of-range'
  | 'ambiguous-date'
  | 'invalid-date'
  | 'no-readings'
  | 'lines-skipped'
  | 'missing-test'
  | 'missing-result'
  | 'duplicate-test'
  | 'mixed-units'
  | 'unknown-unit';

export interface LabCsvIssue {
  /** An error blocks the import; a warning is shown in the preview and does not. */
  severity: 'error' | 'warning';
  code: LabCsvIssueCode;
  /** 1-based line number in the file, or null for the file as a whole. */
  row: number | null;
  /** Header text of the column, or null when the issue is not about one column. */
  column: string | null;
  message: string;
}

export type LabCsvMappingTarget = MeasurandCode | 'bottle' | 'sampled' | 'reported' | 'ignore';

export interface ParseLabCsvOptions {
  /** A saved lab profile: header text (exact, or ignoring case and surrounding spaces) → meaning. */
  mapping?: Record<string, LabCsvMappingTarget>;
  /** Settles day/month order for dates like 03/04/2026 when the file cannot. */
  dateOrder?: DateOrder;
  /** 'papaparse' splits every file with papaparse; 'auto' (the default) splits a file without quotes by lines. */
  splitter?: CsvSplitter;
}

export interface LabCsvResult {
  rows: LabCsvRow[];
  columns: LabCsvColumn[];
  errors: LabCsvIssue[];
  delimiter: ',' | ';' | '\t';
  decimalMark: DecimalMark;
  /** Line of the header row, and of the units row under it if there is one. */
  headerLine: number | null;
  unitsLine: number | null;
  /** 'long' when the file had one row per bottle and test and was pivoted to one row per bottle. */
  layout?: 'wide' | 'long';
}

type ReadingSetter = (readings: LabReadings, reading: LabReading) => void;

/**
 * One store per measurand, written out: `readings[code] = …` with 30 codes through one line of code is a
 * megamorphic keyed store that V8 hands to its runtime for every new property, and on a 10,000-row file that was a
 * third of the reader's time. A named store per code stays on the fast path.
 */
const SET_READING: Readonly<Record<MeasurandCode, ReadingSetter>> = {
  Fe: (o, r) => {
    o.Fe = r;
  },
  Al: (o, r) => {
    o.Al = r;
  },
  Cr: (o, r) => {
    o.Cr = r;
  },
  Cu: (o, r) => {
    o.Cu = r;
  },
  Pb: (o, r) => {
    o.Pb = r;
  },
  Sn: (o, r) => {
    o.Sn = r;
  },
  Ni: (o, r) => {
    o.Ni = r;
  },
  Ag: (o, r) => {
    o.Ag = r;
  },
  Ti: (o, r) => {
    o.Ti = r;
  },
  V: (o, r) => {
    o.V = r;
  },
  Mn: (o, r) => {
    o.Mn = r;
  },
  Si: (o, r) => {
    o.Si = r;
  },
  Na: (o, r) => {
    o.Na = r;
  },
  K: (o, r) => {
    o.K = r;
  },
  B: (o, r) => {
    o.B = r;
  },
  Mo: (o, r) => {
    o.Mo = r;
  },
  Zn: (o, r) => {
    o.Zn = r;
  },
  P: (o, r) => {
    o.P = r;
  },
  Ca: (o, r) => {
    o.Ca = r;
  },
  Mg: (o, r) => {
    o.Mg = r;
  },
  Ba: (o, r) => {
    o.Ba = r;
  },
  S: (o, r) => {
    o.S = r;
  },
  KV40: (o, r) => {
    o.KV40 = r;
  },
  KV100: (o, r) => {
    o.KV100 = r;
  },
  VI: (o, r) => {
    o.VI = r;
  },
  SUS210: (o, r) => {
    o.SUS210 = r;
  },
  FLASH: (o, r) => {
    o.FLASH = r;
  },
  FUEL: (o, r) => {
    o.FUEL = r;
  },
  WATER: (o, r) => {
    o.WATER = r;
  },
  GLYCOL: (o, r) => {
    o.GLYCOL = r;
  },
  INSOL: (o, r) => {
    o.INSOL = r;
  },
  TBN: (o, r) => {
    o.TBN = r;
  },
  TAN: (o, r) => {
    o.TAN = r;
  },
  OXI: (o, r) => {
    o.OXI = r;
  },
  NIT: (o, r) => {
    o.NIT = r;
  },
};

/**
 * Distinct values kept per file and qualifier; past this a file of all-different figures just allocates (common
 * practice, no published source).
 */
const MAX_PLAIN_READINGS = 65_536;

/** Keys held in PlainReadings' table: 2^20 slots (4 MB at most), enough for one-decimal figures up to 6,553.5. */
const SMALL_KEYS = 2 ** 20;

/**
 * The readings of fast-path cells, one frozen object per distinct value (and qualifier) in a file. A lab's figures
 * repeat ("<1" in every clean column, whole ppm, one decimal), so a 10,000-row file keeps a few thousand objects
 * instead of 270,000; frozen, so no reader of the result can change one row's
 * reading through another's. `get` answers undefined for a text that is not plain (see plain-cells.ts).
 */
class PlainReadings {
  // Keyed by the value read, not by the cell's text: a number hashes without reading a fresh string's characters,
  // and "12", "12.0" and "12,0" share one object. One map per qualifier.
  private readonly plain = new Map<number, LabReading>();
  private readonly below = new Map<number, LabReading>();
  private readonly above = new Map<number, LabReading>();

  // Cells seen before, by plainNumberKey and qualifier: a small-integer key finds the shared reading without
  // making a number. A miss goes on to the maps by value, so "12" and "12.0" still share one reading.
  // Small keys (whole ppm and one-decimal figures up to a few thousand) index a typed array holding 1 + the
  // reading's place in `known` (0 for none yet): zero-filled at birth and never a sparse JavaScript array, which V8
  // keeps as a hash table once it is large. The table grows by doubling up to SMALL_KEYS slots; larger keys go to
  // the map.
  private readonly byKey = new Map<number, LabReading>();
  private small = new Int32Array(0);
  private readonly known: LabReading[] = [];

  constructor(private readonly mark: DecimalMark) {}

  /** The reading of the cell `text.slice(start, end)`, read in place. */
  get(text: string, start: number, end: number): LabReading | undefined {
    const first = start < end ? text.charCodeAt(start) : -1;
    const notDetected = isBareNotDetected(text, start, end);
    const qualifier: Qualifier | undefined = first === 60 || notDetected ? '<' : first === 62 ? '>' : undefined;
    const from = qualifier === undefined ? start : start + 1;
    const key = notDetected ? 0 : plainNumberKey(text, this.mark, from, end);
    if (key >= 0) {
      const keyed = key * 4 + (qualifier === undefined ? 0 : qualifier === '<' ? 1 : 2);
      if (keyed < this.small.length) {
        const slot = this.small[keyed]!;
        if (slot !== 0) return this.known[slot - 1];
      } else if (keyed >= SMALL_KEYS) {
        const known = this.byKey.get(keyed);
        if (known !== undefined) return known;
      }
      const reading = this.byValue(plainKeyValue(key), qualifier);
      if (keyed < SMALL_KEYS) {
        if (keyed >= this.small.length) this.growSmall(keyed);
        this.known.push(reading);
        this.small[keyed] = this.known.length;
      } else if (this.byKey.size < MAX_PLAIN_READINGS) this.byKey.set(keyed, reading);
      return reading;
    }
    const value = notDetected ? 0 : parsePlainNumber(text, this.mark, from, end);
    return Number.isNaN(value) ? undefined : this.byValue(value, qualifier);
  }

  private growSmall(keyed: number): void {
    let size = Math.max(1024, this.small.length);
    while (size <= keyed) size *= 2;
    const grown = new Int32Array(Math.min(size, SMALL_KEYS));
    grown.set(this.small);
    this.small = grown;
  }

  private byValue(value: number, qualifier: Qualifier | undefined): LabReading {
    const byValue = qualifier === undefined ? this.plain : qualifier === '<' ? this.below : this.above;
    let reading = byValue.get(value);
    if (reading === undefined) {
      reading = Object.freeze(qualifier === undefined ? { value } : { value, qualifier });
      if (byValue.size < MAX_PLAIN_READINGS) byValue.set(value, reading);
    }
    return reading;
  }
}

/** Longest bottle code accepted; lab kit numbers and Sumpwise codes are far shorter. */
const MAX_BOTTLE_CODE_LENGTH = MAX_BOTTLE_CODE_TEXT;

/** Sanity ceiling for kinematic viscosity: ISO 3448's heaviest grade, VG 3200, tops out at 3520 mm²/s (from memory); 100,000 leaves room for anything real. */
const MAX_VISCOSITY = 100_000;

interface Bounds {
  max: number;
  why: string;
}

function boundsFor(code: MeasurandCode): Bounds {
  if ((ELEMENT_CODES as readonly string[]).includes(code)) {
    // 1,000,000 mg/kg is the whole kilogram: a physical bound, not a judgement.
    return { max: 1_000_000, why: '1,000,000 ppm would mean the sample is nothing but that element' };
  }
  switch (code) {
    case 'FUEL':
    case 'WATER':
    case 'INSOL':
      return { max: 100, why: 'a share of the sample cannot exceed 100 %' };
    case 'TBN':
    case 'TAN':
      // Pure KOH neutralises 1000 mg KOH per gram by definition of the unit.
      return { max: 1000, why: 'not even pure potassium hydroxide reaches 1000 mg KOH/g' };
    case 'KV40':
    case 'KV100':
      return { max: MAX_VISCOSITY, why: 'no engine or gear oil is anywhere near 100,000 mm²/s' };
    case 'SUS210':
      return { max: 4.6324 * MAX_VISCOSITY, why: 'no engine or gear oil is anywhere near that many Saybolt seconds' };
    case 'VI':
      return { max: 1000, why: 'viscosity index of oils stays in the hundreds (common practice, no published source)' };
    case 'FLASH':
      return { max: 1000, why: 'oils flash far below 1000 °C (common practice, no published source)' };
    case 'GLYCOL':
      return { max: 1, why: 'glycol is read as positive (1) or negative (0)' };
    default:
      return { max: Number.POSITIVE_INFINITY, why: '' };
  }
}

function defaultUnit(code: MeasurandCode): LabUnit | undefined {
  if ((ELEMENT_CODES as readonly string[]).includes(code)) return 'ppm';
  switch (code) {
    case 'KV40':
    case 'KV100':
      return 'mm²/s';
    case 'SUS210':
      return 'SUS';
    case 'TBN':
    case 'TAN':
      return 'mg KOH/g';
    case 'FUEL':
    case 'WATER':
    case 'INSOL':
      return '%';
    case 'FLASH':
      return '°C';
    default:
      return undefined;
  }
}

/** Readable name of a measurand for messages. */
const MEASURAND_LABELS: Partial<Record<MeasurandCode, string>> = {
  Fe: 'iron',
  Al: 'aluminium',
  Cr: 'chromium',
  Cu: 'copper',
  Pb: 'lead',
  Sn: 'tin',
  Ni: 'nickel',
  Ag: 'silver',
  Ti: 'titanium',
  V: 'vanadium',
  Mn: 'manganese',
  Si: 'silicon',
  Na: 'sodium',
  K: 'potassium',
  B: 'boron',
  Mo: 'molybdenum',
  Zn: 'zinc',
  P: 'phosphorus',
  Ca: 'calcium',
  Mg: 'magnesium',
  Ba: 'barium',
  S: 'sulfur',
  KV40: 'viscosity at 40 °C',
  KV100: 'viscosity at 100 °C',
  VI: 'viscosity index',
  SUS210: 'Saybolt viscosity at 210 °F',
  FLASH: 'flash point',
  FUEL: 'fuel dilution',
  WATER: 'water',
  GLYCOL: 'glycol',
  INSOL: 'insolubles',
  TBN: 'TBN',
  TAN: 'TAN',
};

function describeCode(code: MeasurandCode): string {
  const label = MEASURAND_LABELS[code] ?? code;
  return label === code ? code : `${label} (${code})`;
}

/** Quote a cell for a message: shortened, so a pasted essay does not flood the preview. */
function quoteCell(text: string): string {
  const short = text.length > 40 ? `${text.slice(0, 37)}...` : text;
  return `"${short}"`;
}

function where(line: number, column: string): string {
  return `Line ${line}, column "${column}"`;
}

/** Count delimiter characters outside double quotes. */
function countOutsideQuotes(line: string, delimiter: string): number {
  let count = 0;
  let quoted = false;
  for (let i = 0; i < line.length; i += 1) {
    const ch = line[i];
    if (ch === '"') quoted = !quoted;
    else if (ch === delimiter && !quoted) count += 1;
  }
  return count;
}

/**
 * Pick the delimiter: the one whose count per line is the same on the most of the first lines
 * (a decimal comma varies from line to line; the real delimiter does not). Ties go to tab, then
 * semicolon, then comma, since a tab or semicolon in a comma file is rarer than the reverse.
 */
function detectDelimiter(lines: readonly string[]): ',' | ';' | '\t' {
  let best: { delimiter: ',' | ';' | '\t'; frequency: number; mode: number } = {
    delimiter: ',',
    frequency: 0,
    mode: 0,
  };
  for (const delimiter of ['\t', ';', ','] as const) {
    const tally = new Map<number, number>();
    for (const line of lines) {
      const n = countOutsideQuotes(line, delimiter);
      if (n > 0) tally.set(n, (tally.get(n) ?? 0) + 1);
    }
    for (const [mode, frequency] of tally) {
      if (frequency > best.frequency || (frequency === best.frequency && mode > best.mode)) {
        best = { delimiter, frequency, mode };
      }
    }
  }
  return best.delimiter;
}

/** Decide the decimal mark from the numbers themselves; see parseLabCsv's doc for the rule. */
function detectDecimalMark(
  delimiter: ',' | ';' | '\t',
  grid: CsvGrid,
  start: number,
  preferComma = false,
): DecimalMark {
  if (delimiter === ',') return '.';
  let commaEvidence = false;
  let pointEvidence = false;
  const limit = Math.min(grid.length, start + 200);
  for (let r = start; r < limit; r += 1) {
    const row = grid.row(r) ?? [];
    for (const raw of row) {
      const cell = raw.trim();
      if (cell.length > 24 || !/^[<>≤≥]?\s*[\d.,\s]+$/.test(cell)) continue;
      // "1.234" or "1,234" could be a grouped thousand either way: not evidence.
      if (/\d,\d/.test(cell) && !/^[<>≤≥]?\s*\d{1,3}(,\d{3})+$/.test(cell)) commaEvidence = true;
      if (/\d\.\d/.test(cell) && !/^[<>≤≥]?\s*\d{1,3}(\.\d{3})+$/.test(cell)) pointEvidence = true;
    }
  }
  if (delimiter === ';') return pointEvidence && !commaEvidence ? '.' : ',';
  // Without evidence either way, a report in a decimal-comma language keeps its comma.
  if (!commaEvidence && !pointEvidence) return preferComma ? ',' : '.';
  return commaEvidence && !pointEvidence ? ',' : '.';
}

function normaliseMappingKey(header: string): string {
  return header.normalize('NFKC').trim().toLowerCase();
}

/** The recogniser's answer, or the lab profile's when it names this header. */
function resolveHeader(
  header: string,
  unitsCell: string,
  mapping: ReadonlyMap<string, LabCsvMappingTarget> | null,
  exactMapping: Readonly<Record<string, LabCsvMappingTarget>> | undefined,
): RecognisedHeader {
  const recognised = recogniseHeader(header, unitsCell);
  const target = exactMapping?.[header] ?? mapping?.get(normaliseMappingKey(header));
  if (target === undefined) return recognised;
  if (target === 'ignore') return { kind: 'ignored', note: 'ignored by the lab profile' };
  if (target === 'bottle' || target === 'sampled' || target === 'reported') return { kind: target };
  if (!isMeasurandCode(target)) return recognised;
  // Keep a unit the header states when it fits the mapped code (a profile can map "Visc 210F SUS" to KV100).
  const unit = recognised.unit;
  if (target === 'KV100' && unit === 'SUS') return { kind: 'measurand', code: 'SUS210', unit: 'SUS' };
  return unit === undefined ? { kind: 'measurand', code: target } : { kind: 'measurand', code: target, unit };
}

type CellReader = (cell: string) => ReadingParse;

interface MeasurandPlan {
  index: number;
  header: string;
  code: MeasurandCode;
  set: ReadingSetter;
  read: CellReader;
  convert: ((value: number) => number) | null;
  /** For a Saybolt column: also write KV100 converted from it. */
  alsoKv100: boolean;
  bounds: Bounds;
  /** Plain numbers need no grouping or conversion handling: the hot path of a big file (see plain-cells.ts). */
  fast: boolean;
}

function planColumns(
  headerCells: readonly string[],
  unitsCells: readonly string[] | null,
  options: ParseLabCsvOptions,
  mark: DecimalMark,
  headerLine: number,
  issues: LabCsvIssue[],
): { columns: LabCsvColumn[]; measurands: MeasurandPlan[] } {
  const exact = options.mapping;
  const folded = exact ? new Map(Object.entries(exact).map(([k, v]) => [normaliseMappingKey(k), v] as const)) : null;
  const recognised = headerCells.map((header, index) =>
    resolveHeader(header.trim(), unitsCells?.[index] ?? '', folded, exact),
  );
  const hasDirectKv100 = recognised.some((r) => r.kind === 'measurand' && r.code === 'KV100');
  const columns: LabCsvColumn[] = [];
  const measurands: MeasurandPlan[] = [];
  const firstSeen = new Map<string, LabCsvColumn>();
  const readNumber: CellReader = (cell) => parseReadingCell(cell, mark);

  recognised.forEach((r, index) => {
    const header = headerCells[index]?.trim() || `column ${index + 1}`;
    const column: LabCsvColumn = { index, header, kind: r.kind };
    if (r.note !== undefined) column.note = r.note;
    columns.push(column);
    if (r.kind === 'unknown') {
      // A blank header over blank cells is a trailing delimiter, not a column; it is reported only if it holds data.
      if (!headerCells[index]?.trim()) return;
      issues.push({
        severity: 'warning',
        code: 'unknown-column',
        row: headerLine,
        column: header,
        message: `${where(headerLine, header)}: this column was not recognised${r.note ? ` (${r.note})` : ''}. Its cells are kept as text and not read as readings; a lab profile can map it.`,
      });
      return;
    }
    if (r.kind === 'ignored') return;
    const key = r.kind === 'measurand' ? (r.code ?? '') : r.kind;
    const earlier = firstSeen.get(key);
    if (earlier) {
      column.kind = 'ignored';
      column.note = `same meaning as column "${earlier.header}"`;
      issues.push({
        severity: 'error',
        code: 'duplicate-column',
        row: headerLine,
        column: header,
        message: `${where(headerLine, header)}: reads as ${r.kind === 'measurand' && r.code ? describeCode(r.code) : `the ${r.kind === 'bottle' ? 'bottle code' : `${r.kind} date`}`}, like column "${earlier.header}". Remove one of them, or map one to "ignore" in the lab profile.`,
      });
      return;
    }
    firstSeen.set(key, column);
    if (r.kind !== 'measurand' || r.code === undefined) return;

    const code = r.code;
    column.code = code;
    const unit = r.unit ?? defaultUnit(code);
    if (unit !== undefined) column.unit = unit;
    let convert: ((v: number) => number) | null = null;
    let alsoKv100 = false;
    if ((ELEMENT_CODES as readonly string[]).includes(code) && unit === '%') {
      convert = (v) => v * 10_000; // 1 % = 10,000 ppm (mass fraction).
      column.conversion = '%→ppm';
    } else if (code === 'WATER' && unit === 'ppm') {
      convert = (v) => v / 10_000;
      column.conversion = 'ppm→%';
    } else if (code === 'FLASH' && unit === '°F') {
      convert = (v) => ((v - 32) * 5) / 9;
      column.conversion = '°F→°C';
    } else if (code === 'SUS210' && !hasDirectKv100) {
      // The catalogue keeps the lab's SUS as reported and gains KV100 by ASTM D2161.
      alsoKv100 = true;
      column.code = 'KV100';
      column.conversion = 'SUS210→KV100';
    }
    measurands.push({
      index,
      header,
      code,
      set: SET_READING[code],
      read: code === 'GLYCOL' ? readGlycolCell : readNumber,
      convert,
      alsoKv100,
      bounds: boundsFor(code),
      fast: code !== 'GLYCOL' && convert === null && !alsoKv100,
    });
  });
  return { columns, measurands };
}

function problemMessage(problem: string, detail: string, line: number, column: string, mark: DecimalMark): string {
  const at = where(line, column);
  switch (problem) {
    case 'formula-like-cell':
      return `${at}: ${quoteCell(detail)} starts like a spreadsheet formula. It was kept as text and not run; the lab should send a number here.`;
    case 'negative-value':
      return `${at}: ${quoteCell(detail)} is negative, and a lab reading cannot be below zero. Check the cell against the lab's report.`;
    case 'unclear-number':
      return mark === '.'
        ? `${at}: ${quoteCell(detail)} has a comma inside a number. In this file the decimal mark is a point, so the comma can only group thousands (1,234); write 1.5 or 1,234.`
        : `${at}: ${quoteCell(detail)} has a point inside a number. In this file the decimal mark is a comma, so the point can only group thousands (1.234,5); write 1,5 or 1.234.`;
    default:
      return `${at}: ${quoteCell(detail)} is not a number. Leave the cell blank if there is no result, or write a number such as 12, <1 or ND.`;
  }
}

interface PendingDate {
  row: LabCsvRow;
  field: 'sampled' | 'reported';
  cell: Extract<DateCell, { kind: 'numeric' }>;
  raw: string;
}

/**
 * Read a lab CSV: delimiter (comma, semicolon, tab), BOM, CRLF, quoted fields, units in headers or in a
 * units row under the header, decimal commas in semicolon files, detection-limit qualifiers and dates.
 *
 * Rules worth knowing:
 * - Decimal mark: comma files use a point ("1,234" only as a quoted, grouped thousand). Semicolon files
 *   use a comma unless no number has a comma between digits and some number has a point that cannot be
 *   a grouped thousand. Tab files use a point unless the reverse holds.
 * - Dates: ISO and month-name dates are exact. For d/m/y versus m/d/y the column decides: a cell whose
 *   first number is over 12 is day-first, one whose second number is over 12 is month-first, a dotted
 *   date (03.04.2026) is day-first. When the column's other cells all point one way, its ambiguous cells
 *   (both numbers 12 or less and different) follow; otherwise each is an "ambiguous-date" error, never a
 *   guess. `options.dateOrder` (a lab profile) settles it instead.
 * - Cells below detection ("<1", "ND", "n.d.") keep qualifier '<'; ND without a limit is 0.
 * - Rows with a wrong number of cells, or no bottle code, are reported and left out of `rows`.
 */
export function parseLabCsv(text: string, options: ParseLabCsvOptions = {}): LabCsvResult {
  const issues: LabCsvIssue[] = [];
  const result = (
    rows: LabCsvRow[],
    columns: LabCsvColumn[],
    delimiter: LabCsvResult['delimiter'],
    decimalMark: DecimalMark,
    headerLine: number | null,
    unitsLine: number | null,
  ): LabCsvResult => ({ rows, columns, errors: issues, delimiter, decimalMark, headerLine, unitsLine });

  // One line ending everywhere: papaparse picks a single newline style per file, and mixed files exist.
  let body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.includes('\r')) body = body.replace(/\r\n?/g, '\n');
  if (body.trim() === '') {
    issues.push({
      severity: 'error',
      code: 'empty-file',
      row: null,
      column: null,
      message: 'The file is empty: it holds no header and no readings.',
    });
    return result([], [], ',', '.', null, null);
  }

  const firstLines: string[] = [];
  for (let from = 0; firstLines.length < 20 && from < body.length;) {
    const end = body.indexOf('\n', from);
    const line = body.slice(from, end === -1 ? body.length : end);
    if (line.trim() !== '') firstLines.push(line);
    if (end === -1) break;
    from = end + 1;
  }
  // Spreadsheet exports may open with a "sep=;" line naming the delimiter; it is honoured, then read as blank.
  const sepLine = /^sep=([,;\t])\n/i.exec(body);
  if (sepLine) body = `\n${body.slice(sepLine[0].length)}`;
  const delimiter =
    sepLine?.[1] === ',' || sepLine?.[1] === ';' || sepLine?.[1] === '\t'
      ? sepLine[1]
      : detectDelimiter(firstLines.slice(sepLine ? 1 : 0));
  const { grid: rowsRead, errors: splitErrors } = readCsvGrid(body, delimiter, options.splitter);
  let grid = rowsRead;

  const brokenRows = new Set<number>();
  for (const e of splitErrors) {
    brokenRows.add(e.row);
    const line = grid.lineOf(e.row);
    issues.push({
      severity: 'error',
      code: 'malformed-csv',
      row: line,
      column: null,
      message:
        e.code === 'MissingQuotes'
          ? `Line ${line}: a quoted cell is never closed (a " is missing), so the rest of the file cannot be read reliably.`
          : `Line ${line}: the CSV is malformed here (${e.message}).`,
    });
  }

  // The header is the first of the opening rows that reads as one: a lab may put a title line above it.
  const mappedHeaders = new Set(Object.keys(options.mapping ?? {}).map(normaliseMappingKey));
  let headerRow = -1;
  let fallbackRow = -1;
  for (let r = 0, seen = 0; r < grid.length && seen < 10; r += 1) {
    const row = grid.row(r);
    if (grid.isBlank(r) || !row) continue;
    seen += 1;
    if (fallbackRow === -1) fallbackRow = r;
    const meaningful = row.filter(
      (cell) => recogniseHeader(cell.trim()).kind !== 'unknown' || mappedHeaders.has(normaliseMappingKey(cell)),
    ).length;
    if (meaningful >= 2) {
      headerRow = r;
      break;
    }
  }
  if (headerRow === -1) headerRow = fallbackRow;
  let headerCells = grid.row(headerRow) ?? [];
  const headerLine = headerRow === -1 ? 1 : grid.lineOf(headerRow);
  if (headerRow !== fallbackRow) {
    const firstSkipped = fallbackRow === -1 ? 1 : grid.lineOf(fallbackRow);
    issues.push({
      severity: 'warning',
      code: 'lines-skipped',
      row: firstSkipped,
      column: null,
      message: `${firstSkipped === headerLine - 1 ? `Line ${firstSkipped} comes` : `Lines ${firstSkipped} to ${headerLine - 1} come`} before the header row (line ${headerLine}) and ${firstSkipped === headerLine - 1 ? 'was' : 'were'} skipped as a title.`,
    });
  }

  // A units row sits right under the header: every filled cell is a unit ("ppm", "cSt", "SUS", "%").
  let firstDataRow = headerRow + 1;
  let unitsCells: readonly string[] | null = null;
  let unitsLine: number | null = null;
  const candidate = grid.row(firstDataRow);
  if (candidate && !grid.isBlank(firstDataRow)) {
    if (filledUnitsRow(candidate)) {
      unitsCells = candidate;
      unitsLine = grid.lineOf(firstDataRow);
      firstDataRow += 1;
    }
  }

  // Footers, headers repeated at page breaks and blank separator lines are skipped with a note. A wide file meets
  // them in the loop over its rows below (each row split once); their notes go here, ahead of the rows' issues.
  const furnitureAt = issues.length;
  const furnitureInput = { grid, firstDataRow, headerCells, isUnitsRow: filledUnitsRow };
  const addFurnitureNotes = (notes: readonly LabCsvIssue[]): void => void issues.splice(furnitureAt, 0, ...notes);
  let furniture: PageFurnitureScanner | null = new PageFurnitureScanner(headerCells, filledUnitsRow);
  const languages = detectHeaderLanguages(headerCells);
  const dayFirstLanguage = languages.find((l) => DAY_FIRST_LANGUAGES.has(l));

  // One row per bottle and test: pivoted to one row per bottle, then read like any wide file.
  let pivot: PivotResult | null = null;
  const long = detectLongFormat(
    headerCells,
    headerCells.map(
      (h, i) => resolveHeader(h.trim(), unitsCells?.[i] ?? '', foldedMapping(options), options.mapping).kind,
    ),
  );
  if (long) {
    // A long file is read whole: its rows are grouped by bottle before any is read.
    const { skip, notes } = findPageFurniture(furnitureInput);
    addFurnitureNotes(notes);
    furniture = null;
    const allRows = Array.from({ length: grid.length }, (_, r) => [...(grid.row(r) ?? [])]);
    pivot = pivotLongFormat({
      plan: long,
      headerCells,
      data: allRows,
      firstDataRow,
      lineOf: Array.from({ length: grid.length }, (_, r) => grid.lineOf(r)),
      headerLine,
      skip: new Set([...skip, ...brokenRows]),
      normaliseBottle: normaliseBottleCode,
    });
    issues.push(...pivot.issues);
    grid = arrayGrid(pivot.grid, pivot.lines);
    headerCells = pivot.grid[0] ?? [];
    unitsCells = pivot.units;
    firstDataRow = 1;
    brokenRows.clear();
  }
  const issuesBeforeRows = issues.length;

  const decimalMark = detectDecimalMark(delimiter, grid, firstDataRow, dayFirstLanguage !== undefined);
  const { columns, measurands } = planColumns(headerCells, unitsCells, options, decimalMark, headerLine, issues);
  const bottleColumn = columns.find((c) => c.kind === 'bottle');
  const sampledColumn = columns.find((c) => c.kind === 'sampled');
  const reportedColumn = columns.find((c) => c.kind === 'reported');
  const otherColumns = columns.filter((c) => c.kind === 'unknown');

  let dataRowCount = 0;
  for (let r = firstDataRow; r < grid.length; r += 1) if (!grid.isBlank(r)) dataRowCount += 1;
  if (dataRowCount === 0) {
    issues.push({
      severity: 'error',
      code: 'no-data-rows',
      row: headerLine,
      column: null,
      message: `Line ${headerLine} is a header row, but no rows of readings follow it. Export the report again with its results.`,
    });
    if (furniture) addFurnitureNotes(findPageFurniture(furnitureInput).notes);
    return { ...result([], columns, delimiter, decimalMark, headerLine, unitsLine), layout: pivot ? 'long' : 'wide' };
  }
  if (!bottleColumn) {
    issues.push({
      severity: 'error',
      code: 'no-bottle-column',
      row: headerLine,
      column: null,
      message: `Line ${headerLine} (the header) has no bottle code column, so no row can be matched to a sample. Columns found: ${columns.map((c) => `"${c.header}"`).join(', ')}. Name the column "Bottle" or map it in the lab profile.`,
    });
    if (furniture) addFurnitureNotes(findPageFurniture(furnitureInput).notes);
    return result([], columns, delimiter, decimalMark, headerLine, unitsLine);
  }

  const rows: LabCsvRow[] = [];
  const rowReading: RowReading = {
    width: headerCells.length,
    columns,
    bottleColumn,
    dateColumns: [sampledColumn, reportedColumn].filter((c) => c !== undefined),
    measurands,
    otherColumns,
    decimalMark,
    issues,
    readings: new PlainReadings(decimalMark),
    bottleLines: new Map<string, number>(),
    pendingDates: new Map<number, PendingDate[]>(),
    found: measurands.map(() => undefined),
    template: readingsTemplate(measurands),
  };

  for (let r = firstDataRow; r < grid.length; r += 1) {
    if (furniture) {
      const verdict = furniture.visit(grid, r);
      if (verdict === 'skip-next-too') r += 1;
      if (verdict !== 'read') continue;
    } else if (grid.isBlank(r)) continue;
    // The row's cells as ranges of the text: a plain number is read where it lies, never copied out.
    const cells = grid.view(r);
    if (!cells) continue;
    if (brokenRows.has(r)) continue;
    const row = readDataRow(rowReading, cells, grid.lineOf(r));
    if (row !== null) rows.push(row);
  }

  for (const column of otherColumns) {
    if (headerCells[column.index]?.trim() || !rows.some((row) => column.header in row.other)) continue;
    issues.push({
      severity: 'warning',
      code: 'unknown-column',
      row: headerLine,
      column: column.header,
      message: `${where(headerLine, column.header)}: this column has no header but holds values. They are kept as text and not read as readings; a lab profile can map it.`,
    });
  }
  if (furniture) addFurnitureNotes(furniture.notes());
  settleDates(rowReading.pendingDates, columns, options.dateOrder, issues, dayFirstLanguage);
  if (pivot) rewordPivotIssues(issues, issuesBeforeRows, pivot, headerLine);
  return { ...result(rows, columns, delimiter, decimalMark, headerLine, unitsLine), layout: pivot ? 'long' : 'wide' };
}

/** What a row's `readings` holds until its cells are read: one frozen object, not one made per row. */
const NO_READINGS_YET: LabReadings = Object.freeze({});

/** What reading one data row needs, made once per file; `found` is scratch space reused row after row. */
interface RowReading {
  width: number;
  columns: readonly LabCsvColumn[];
  bottleColumn: LabCsvColumn;
  dateColumns: readonly LabCsvColumn[];
  measurands: readonly MeasurandPlan[];
  otherColumns: readonly LabCsvColumn[];
  decimalMark: DecimalMark;
  issues: LabCsvIssue[];
  readings: PlainReadings;
  /** First line of each bottle code, to tell a repeated code. */
  bottleLines: Map<string, number>;
  /** Dates that read either way round, settled by column once every row is read. */
  pendingDates: Map<number, PendingDate[]>;
  /** Each row's readings, by plan, before they become the row's object. */
  found: (LabReading | undefined)[];
  /** That object's shape when every column of the file holds a reading (see collectReadings). */
  template: LabReadings | null;
}

/**
 * One data row read into a LabCsvRow, or null when it cannot be matched to a sample; its problems go to
 * `issues`. A function of its own, so that V8 optimises it once for the 10,000 calls of a big file instead of
 * compiling the whole reader again in the middle of every file's row loop.
 */
function readDataRow(reading: RowReading, cells: RowView, line: number): LabCsvRow | null {
  const {
    width,
    columns,
    bottleColumn,
    dateColumns,
    measurands,
    otherColumns,
    decimalMark,
    issues,
    readings,
    bottleLines,
    pendingDates,
    found,
    template,
  } = reading;
  let cellCount = cells.length;
  if (cellCount > width) {
    let trailingBlank = true;
    for (let i = width; i < cellCount && trailingBlank; i += 1) trailingBlank = !cells.isFilled(i);
    if (trailingBlank) cellCount = width;
  }
  if (cellCount !== width) {
    issues.push({
      severity: 'error',
      code: 'ragged-row',
      row: line,
      column: cellCount > width ? (columns[width - 1]?.header ?? null) : (columns[cellCount]?.header ?? null),
      message: `Line ${line} has ${cellCount} cells but the header has ${width}, so its values cannot be matched to columns (from column "${(cellCount > width ? columns[width - 1] : columns[cellCount])?.header ?? '?'}" on). In a comma file, a decimal comma such as 12,5 splits a cell in two.`,
    });
    return null;
  }

  const bottleRaw = cells.cell(bottleColumn.index).trim();
  if (bottleRaw === '') {
    issues.push({
      severity: 'error',
      code: 'missing-bottle-code',
      row: line,
      column: bottleColumn.header,
      message: `${where(line, bottleColumn.header)}: the bottle code is blank, so this row cannot be matched to a sample.`,
    });
    return null;
  }
  if (isFormulaLikeCell(bottleRaw)) {
    issues.push({
      severity: 'error',
      code: 'formula-like-cell',
      row: line,
      column: bottleColumn.header,
      message: problemMessage('formula-like-cell', bottleRaw, line, bottleColumn.header, decimalMark).replace(
        'the lab should send a number here',
        'a bottle code never starts like this',
      ),
    });
    return null;
  }
  if (bottleRaw.length > MAX_BOTTLE_CODE_LENGTH) {
    issues.push({
      severity: 'error',
      code: 'bottle-code-too-long',
      row: line,
      column: bottleColumn.header,
      message: `${where(line, bottleColumn.header)}: the bottle code is ${bottleRaw.length} characters long; codes up to ${MAX_BOTTLE_CODE_LENGTH} are accepted.`,
    });
    return null;
  }
  const issuesBeforeRow = issues.length;
  const normalised = normaliseBottleCode(bottleRaw);
  // The readings are set once read, below (collectReadings); until then the row points at a shared empty object.
  const row: LabCsvRow = { line, bottle: { raw: bottleRaw, normalised }, readings: NO_READINGS_YET, other: {} };
  const earlierLine = bottleLines.get(normalised);
  if (earlierLine !== undefined) {
    issues.push({
      severity: 'error',
      code: 'duplicate-bottle-code',
      row: line,
      column: bottleColumn.header,
      message: `${where(line, bottleColumn.header)}: bottle code ${quoteCell(bottleRaw)} was already used on line ${earlierLine}. One bottle gets one result; remove the repeated row or correct its code.`,
    });
  } else {
    bottleLines.set(normalised, line);
  }

  for (const dateColumn of dateColumns) {
    const field = dateColumn.kind === 'sampled' ? 'sampled' : 'reported';
    const raw = cells.cell(dateColumn.index);
    const isoDay = readIsoDay(raw);
    if (isoDay !== null) {
      row[field] = isoDay;
      continue;
    }
    const parsedDate = readDateCell(raw);
    if (parsedDate.kind === 'exact') row[field] = formatIsoDate(parsedDate.year, parsedDate.month, parsedDate.day);
    else if (parsedDate.kind === 'numeric') {
      const list = pendingDates.get(dateColumn.index) ?? [];
      list.push({ row, field, cell: parsedDate, raw: raw.trim() });
      pendingDates.set(dateColumn.index, list);
    } else if (parsedDate.kind === 'problem') {
      issues.push({
        severity: 'error',
        code: parsedDate.problem,
        row: line,
        column: dateColumn.header,
        message:
          parsedDate.problem === 'formula-like-cell'
            ? problemMessage('formula-like-cell', parsedDate.detail, line, dateColumn.header, decimalMark).replace(
                'the lab should send a number here',
                'a date is expected here',
              )
            : `${where(line, dateColumn.header)}: ${quoteCell(parsedDate.detail)} is not a date that exists. Write it as yyyy-mm-dd, for example 2026-04-03.`,
      });
    }
  }

  let readingCount = 0;
  let kv100FromSaybolt: LabReading | undefined;
  for (let p = 0; p < measurands.length; p += 1) {
    const plan = measurands[p]!;
    found[p] = undefined;
    if (plan.fast) {
      // Plain numbers, "<1"/">1000" and a bare "ND" are read here without a regex, one shared reading per value;
      // anything else, or a value out of bounds (for its message), goes through the full reader below.
      const i = plan.index;
      const reading = readings.get(cells.source(i), cells.start(i), cells.end(i));
      if (reading !== undefined && reading.value <= plan.bounds.max) {
        found[p] = reading;
        readingCount += 1;
        continue;
      }
    }
    const cell = cells.cell(plan.index);
    const parsedCell = plan.read(cell);
    if (parsedCell.status === 'missing') continue;
    if (parsedCell.status === 'problem') {
      issues.push({
        severity: 'error',
        code: parsedCell.problem,
        row: line,
        column: plan.header,
        message: problemMessage(parsedCell.problem, parsedCell.detail, line, plan.header, decimalMark),
      });
      continue;
    }
    // Bounds apply in the catalogue's unit, after conversion (500 ppm of water is 0.05 %).
    const value = plan.convert ? plan.convert(parsedCell.value) : parsedCell.value;
    const bounds = plan.bounds;
    if (value > bounds.max) {
      issues.push({
        severity: 'error',
        code: 'impossible-value',
        row: line,
        column: plan.header,
        message: `${where(line, plan.header)}: ${quoteCell(cell.trim())} is impossible for ${describeCode(plan.code)}: ${bounds.why}. Check the cell against the lab's report.`,
      });
      continue;
    }
    const reading: LabReading =
      parsedCell.qualifier === undefined ? { value } : { value, qualifier: parsedCell.qualifier };
    found[p] = reading;
    readingCount += 1;
    if (plan.alsoKv100) {
      if (parsedCell.belowDetection || parsedCell.value === 0) continue;
      const kv100 = convertSayboltToKinematic(parsedCell.value, 210);
      if (kv100 === null) {
        issues.push({
          severity: 'error',
          code: 'out-of-range',
          row: line,
          column: plan.header,
          message: `${where(line, plan.header)}: ${quoteCell(cell.trim())} Saybolt seconds is below the range ASTM D2161 converts (32 SUS and up), so no viscosity at 100 °C can be given for it.`,
        });
        continue;
      }
      kv100FromSaybolt =
        parsedCell.qualifier === undefined ? { value: kv100 } : { value: kv100, qualifier: parsedCell.qualifier };
    }
  }
  row.readings = collectReadings(found, readingCount, measurands, kv100FromSaybolt, template);

  for (const column of otherColumns) {
    const raw = cells.cell(column.index).trim();
    if (raw === '') continue;
    row.other[column.header] = raw;
    if (isFormulaLikeCell(raw)) {
      issues.push({
        severity: 'warning',
        code: 'formula-like-cell',
        row: line,
        column: column.header,
        message: problemMessage('formula-like-cell', raw, line, column.header, decimalMark).replace(
          '; the lab should send a number here',
          '',
        ),
      });
    }
  }
  if (measurands.length > 0 && readingCount === 0 && issues.length === issuesBeforeRow) {
    issues.push({
      severity: 'warning',
      code: 'no-readings',
      row: line,
      column: null,
      message: `Line ${line} (bottle ${quoteCell(bottleRaw)}) has no readings at all: every measurand cell is blank.`,
    });
  }
  return row;
}

/**
 * An object holding every measurand of the file's plans, in plan order, for `collectReadings` to copy; null when a
 * Saybolt column adds KV100 in between. Its values are placeholders, always overwritten.
 */
function readingsTemplate(measurands: readonly MeasurandPlan[]): LabReadings | null {
  if (measurands.some((plan) => plan.alsoKv100)) return null;
  const template: LabReadings = {};
  const placeholder: LabReading = { value: 0 };
  for (const plan of measurands) plan.set(template, placeholder);
  return template;
}

/**
 * A row's readings object from the readings found per plan. Built key by key, an object of 30 readings regrows its
 * property store every few keys (garbage a 10,000-row file makes 10,000 times); a row with a reading in every
 * column, the common case, copies the template instead, whose store has the right size and keys in the same order.
 */
function collectReadings(
  found: readonly (LabReading | undefined)[],
  count: number,
  measurands: readonly MeasurandPlan[],
  kv100FromSaybolt: LabReading | undefined,
  template: LabReadings | null,
): LabReadings {
  const readings: LabReadings = template !== null && count === measurands.length ? { ...template } : {};
  for (let p = 0; p < measurands.length; p += 1) {
    const reading = found[p];
    if (reading === undefined) continue;
    const plan = measurands[p]!;
    plan.set(readings, reading);
    if (plan.alsoKv100 && kv100FromSaybolt !== undefined) readings.KV100 = kv100FromSaybolt;
  }
  return readings;
}

/** A units row: every filled cell is a unit ("ppm", "cSt", "SUS", "%"). */
function filledUnitsRow(cells: readonly string[]): boolean {
  const filled = cells.map((c) => c.trim()).filter((c) => c !== '' && c !== '-' && c !== '—');
  return filled.length >= 1 && filled.every(isUnitCell);
}

function foldedMapping(options: ParseLabCsvOptions): Map<string, LabCsvMappingTarget> | null {
  const exact = options.mapping;
  return exact ? new Map(Object.entries(exact).map(([k, v]) => [normaliseMappingKey(k), v] as const)) : null;
}

/** A glycol cell, also with the words of the dictionary's languages ("negativ", "positif"). */
function readGlycolCell(cell: string): ReadingParse {
  const local = readLocalGlycolWord(cell);
  return local === null ? parseGlycolCell(cell) : { status: 'ok', value: local };
}

/** A date cell, also with a month name in one of the dictionary's languages ("3. März 2026"). */
function readDateCell(raw: string): DateCell {
  const parsed = parseDateCell(raw);
  if (parsed.kind !== 'problem' || parsed.problem !== 'invalid-date') return parsed;
  const local = parseLocalMonthDate(raw);
  return local && isRealDate(local.year, local.month, local.day) ? { kind: 'exact', ...local } : parsed;
}

/** Settle d/m/y versus m/d/y per column, by the rule in parseLabCsv's doc. */
function settleDates(
  pending: ReadonlyMap<number, PendingDate[]>,
  columns: readonly LabCsvColumn[],
  profileOrder: DateOrder | undefined,
  issues: LabCsvIssue[],
  dayFirstLanguage?: keyof typeof HEADER_LANGUAGES,
): void {
  for (const [index, list] of pending) {
    const header = columns[index]?.header ?? `column ${index + 1}`;
    const orders = new Set<DateOrder>();
    for (const { cell } of list) {
      const evidence = evidenceOfDateOrder(cell);
      if (evidence) orders.add(evidence);
    }
    const languageOrder: DateOrder | null = orders.size === 0 && dayFirstLanguage !== undefined ? 'dmy' : null;
    const columnOrder: DateOrder | null =
      profileOrder ?? (orders.size === 1 ? ([...orders][0] ?? null) : languageOrder);
    let settledByLanguage = 0;
    for (const { row, field, cell, raw } of list) {
      const own = evidenceOfDateOrder(cell);
      const order = own ?? (cell.first === cell.second ? 'dmy' : columnOrder);
      if (order === null) {
        const { first, second, year } = cell;
        issues.push({
          severity: 'error',
          code: 'ambiguous-date',
          row: row.line,
          column: header,
          message: `${where(row.line, header)}: ${quoteCell(raw)} could be ${describeDay(year, second, first)} or ${describeDay(year, first, second)}, and ${orders.size > 1 ? 'this column mixes both orders' : 'no other date in this column settles it'}. Write it as yyyy-mm-dd, or set the date order in the lab profile.`,
        });
        continue;
      }
      if (own === null && cell.first !== cell.second && profileOrder === undefined && languageOrder !== null)
        settledByLanguage += 1;
      const day = order === 'dmy' ? cell.first : cell.second;
      const month = order === 'dmy' ? cell.second : cell.first;
      if (!isRealDate(cell.year, month, day)) {
        issues.push({
          severity: 'error',
          code: 'invalid-date',
          row: row.line,
          column: header,
          message: `${where(row.line, header)}: ${quoteCell(raw)} is not a date that exists when read ${order === 'dmy' ? 'day-month-year' : 'month-day-year'} like the rest of this column. Write it as yyyy-mm-dd.`,
        });
        continue;
      }
      row[field] = formatIsoDate(cell.year, month, day);
    }
    if (settledByLanguage > 0 && dayFirstLanguage !== undefined) {
      issues.push({
        severity: 'warning',
        code: 'ambiguous-date',
        row: null,
        column: header,
        message: `Column "${header}": ${settledByLanguage === 1 ? 'a date such as' : `${settledByLanguage} dates such as`} 03/04/2026 ${settledByLanguage === 1 ? 'was' : 'were'} read day first, as ${HEADER_LANGUAGES[dayFirstLanguage]} reports write them. A lab profile can set the order.`,
      });
    }
  }
}

const MONTH_NAMES = [
  'January',
  'February',
  'March',
  'April',
  'May',
  'June',
  'July',
  'August',
  'September',
  'October',
  'November',
  'December',
];

function describeDay(year: number, month: number, day: number): string {
  return `${day} ${MONTH_NAMES[month - 1] ?? '?'} ${year}`;
}
