/**
 * Lab import: the types and input schemas shared by the service, the routes and the pages.
 * Row types (snake_case) live in src/lib/db/database.ts; these are the domain shapes.
 */
import { z } from 'zod';
import { MEASURAND_CODES, type MeasurandCode } from '../analysis/measurands';
import type { LabCsvColumn, LabCsvIssue, LabCsvMappingTarget, LabReadings } from '../lab-csv/lab-csv';

/** What a column can be mapped to in a lab profile. */
export const MAPPING_TARGETS: readonly LabCsvMappingTarget[] = [
  'bottle',
  'sampled',
  'reported',
  'ignore',
  ...MEASURAND_CODES,
];

export const mappingTargetSchema = z.enum(MAPPING_TARGETS as [LabCsvMappingTarget, ...LabCsvMappingTarget[]]);

/** A saved lab profile, as the preview shows it. */
export interface LabProfile {
  id: string;
  name: string;
  headerSignature: string;
  mapping: Record<string, LabCsvMappingTarget>;
  /** For a workbook: the sheet this profile reads. */
  sheetName?: string | null;
}

/** The stored upload, without its bytes. */
export interface LabFile {
  id: string;
  crewId: string;
  sha256: string;
  fileName: string;
  byteSize: number;
  /** Null for a file that arrived by mail. */
  uploadedBy: string | null;
  uploadedAt: Date;
  /** Set once the file has been confirmed and written. */
  importId: string | null;
  importedAt: Date | null;
}

/**
 * What the user decides per row: write it to its matched sample, replace a sample's earlier results,
 * create the sample on a machine (unknown bottle), or leave the row out.
 */
export type RowDecision =
  { action: 'write' } | { action: 'replace' } | { action: 'skip' } | { action: 'create'; machineId: string };

/** How a row of the file stands against the crew's samples. */
export type RowMatch =
  /** A sample of the crew with this bottle code and no results yet. */
  | { kind: 'matched'; sampleId: string; machineId: string; machineName: string; drawnOn: string }
  /** A sample that already has results: written only after an explicit "replace". */
  | { kind: 'has-results'; sampleId: string; machineId: string; machineName: string; drawnOn: string; existing: number }
  /** No sample of this crew has the code. `codeProblem` says when it looks like a mistyped Sumpwise code. */
  | { kind: 'unknown'; codeProblem: string | null };

export interface PreviewRow {
  line: number;
  bottle: string;
  bottleNorm: string;
  sampled: string | null;
  reported: string | null;
  readings: LabReadings;
  match: RowMatch;
  /** Errors of this row (from the reader and from matching): the import is refused while any remain. */
  errors: LabCsvIssue[];
  warnings: LabCsvIssue[];
  /** The decision in force: the user's, else the default (write a match, nothing for the rest). */
  decision: RowDecision | null;
  /** Why this row cannot be written yet, in words, when `decision` is missing or not allowed. */
  needs: string | null;
  /** For a file already imported: whether this row's readings were written by that import. */
  written: boolean;
}

export interface ImportPreview {
  file: LabFile;
  columns: LabCsvColumn[];
  headers: string[];
  headerSignature: string;
  /** The workbook sheet that was read, for a spreadsheet; null for a text file. */
  sheet: string | null;
  /** The saved profile applied to this header, if any. */
  profile: LabProfile | null;
  /** Issues about the file as a whole (no row) or about a row that the reader dropped. */
  fileIssues: LabCsvIssue[];
  rows: PreviewRow[];
  /** Rows whose bottle is a registered bottle of new oil: written into that new-oil reference. */
  newOilRows: import('../new-oil/new-oil.service').NewOilImportRow[];
  machines: { id: string; name: string }[];
  counts: { rows: number; ready: number; skipped: number; blocked: number; readings: number };
  /** True when one confirm would write: no errors and every row decided. */
  canConfirm: boolean;
}

export interface ImportSummary {
  importId: string;
  samplesWritten: number;
  readingsWritten: number;
  samplesCreated: number;
  samplesReplaced: number;
  findingsWritten: number;
  /** New-oil references whose lab results this import wrote. */
  newOilReferencesWritten: number;
}

/** Hooks for fault tests: each runs inside the confirm transaction, and a throw rolls everything back. */
export interface ConfirmHooks {
  afterReadings?: (trx: unknown) => Promise<void> | void;
}

/** A row decision as it arrives from a form field: "write", "replace", "skip" or "create:<machine id>". */
export const rowDecisionSchema = z.union([
  z.literal('write').transform(() => ({ action: 'write' }) as RowDecision),
  z.literal('replace').transform(() => ({ action: 'replace' }) as RowDecision),
  z.literal('skip').transform(() => ({ action: 'skip' }) as RowDecision),
  z
    .string()
    .regex(/^create:[0-9a-f-]{36}$/i, 'pick a machine to create the sample on')
    .transform((v) => ({ action: 'create', machineId: v.slice('create:'.length) }) as RowDecision),
]);

/** The confirm request: decisions keyed by file line. No crew id: the crew is always the session's. */
export const confirmInputSchema = z
  .object({
    decisions: z.record(z.string().regex(/^\d{1,7}$/, 'is not a line number'), rowDecisionSchema).default({}),
  })
  .strict();

export type ConfirmInput = z.infer<typeof confirmInputSchema>;

/** The lab profile form: a name and one target per column header. */
export const profileInputSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the lab profile a name').max(80, 'Keep the name under 80 characters'),
    mapping: z.record(z.string().max(200), mappingTargetSchema),
  })
  .strict();

export type ProfileInput = z.infer<typeof profileInputSchema>;

/** Form field name of a row decision, e.g. "row.12". */
export function formatDecisionField(line: number): string {
  return `row.${line}`;
}

/** Form field name of a column's mapping, by position, e.g. "col.3". */
export function formatColumnField(index: number): string {
  return `col.${index}`;
}

/** Plain label of a mapping target for the column selects. */
export function describeMappingTarget(target: LabCsvMappingTarget): string {
  switch (target) {
    case 'bottle':
      return 'Bottle code';
    case 'sampled':
      return 'Date sampled';
    case 'reported':
      return 'Date reported';
    case 'ignore':
      return 'Ignore this column';
    default:
      return MEASURAND_LABELS[target] ?? target;
  }
}

const MEASURAND_LABELS: Partial<Record<MeasurandCode, string>> = {
  Fe: 'Fe · iron',
  Al: 'Al · aluminium',
  Cr: 'Cr · chromium',
  Cu: 'Cu · copper',
  Pb: 'Pb · lead',
  Sn: 'Sn · tin',
  Ni: 'Ni · nickel',
  Ag: 'Ag · silver',
  Ti: 'Ti · titanium',
  V: 'V · vanadium',
  Mn: 'Mn · manganese',
  Si: 'Si · silicon',
  Na: 'Na · sodium',
  K: 'K · potassium',
  B: 'B · boron',
  Mo: 'Mo · molybdenum',
  Zn: 'Zn · zinc',
  P: 'P · phosphorus',
  Ca: 'Ca · calcium',
  Mg: 'Mg · magnesium',
  Ba: 'Ba · barium',
  S: 'S · sulfur',
  KV40: 'Viscosity 40 °C (mm²/s)',
  KV100: 'Viscosity 100 °C (mm²/s)',
  VI: 'Viscosity index',
  SUS210: 'Saybolt seconds 210 °F',
  FLASH: 'Flash point °C',
  FUEL: 'Fuel dilution %',
  WATER: 'Water %',
  GLYCOL: 'Glycol (coolant)',
  INSOL: 'Insolubles %',
  TBN: 'TBN (mg KOH/g)',
  TAN: 'TAN (mg KOH/g)',
};

/** The header signature a lab profile is keyed by: each header normalised (NFKC, trimmed, lower case), joined. */
export function computeHeaderSignature(headers: readonly string[]): string {
  return headers.map((h) => h.normalize('NFKC').trim().toLowerCase().replace(/\s+/g, ' ')).join('|');
}

/**
 * Most lines one lab file may hold. A lab's report covers a few to a few hundred bottles; 20,000 is twice
 * the largest file in our benchmarks and bounds the work one upload can cause to a few seconds (common
 * practice, no published source).
 */
export const MAX_LAB_FILE_LINES = 20_000;

/** Lines in a decoded file (a last line without a newline counts), in one pass. */
export function countLines(text: string): number {
  if (text === '') return 0;
  let lines = 0;
  for (let i = text.indexOf('\n'); i !== -1; i = text.indexOf('\n', i + 1)) lines += 1;
  return text.endsWith('\n') ? lines : lines + 1;
}

/** The sentence for a file over the line cap. */
export function tooManyLinesMessage(fileName: string, lines: number): string {
  return `"${fileName}" has ${lines.toLocaleString('en-GB')} lines; one lab file may hold at most ${MAX_LAB_FILE_LINES.toLocaleString('en-GB')}. Split the report into smaller files and upload each.`;
}

/** Rows the preview page lists at most; the rest are counted (common practice, no published source). */
export const PREVIEW_ROW_LIMIT = 200;

export type PreviewRowFilter = 'all' | 'attention';

/** True when a row blocks the confirm: an error, or no decision yet. */
export function blocksConfirm(r: PreviewRow): boolean {
  return r.needs !== null || r.errors.length > 0;
}

/** True when a row deserves a look though it is decided: an unknown bottle, a warning or a skip. */
export function deservesLook(r: PreviewRow): boolean {
  return r.match.kind !== 'matched' || r.warnings.length > 0 || r.decision?.action === 'skip';
}

/**
 * What the preview lists, in file order, in one pass: first the rows that block the confirm, then decided rows
 * worth a look, then ready rows (left out by the 'attention' filter), `limit` in all. Once the listed rows are
 * decided, the next blocking ones take their place.
 */
export function selectPreviewRows(
  rows: readonly PreviewRow[],
  filter: PreviewRowFilter,
  limit = PREVIEW_ROW_LIMIT,
): {
  shown: PreviewRow[];
  /** Rows that need attention (blocking or worth a look). */
  attention: number;
  /** Rows that block the confirm and are not listed. */
  hiddenBlocking: number;
  hiddenReady: number;
} {
  const blocking: PreviewRow[] = [];
  const look: PreviewRow[] = [];
  const ready: PreviewRow[] = [];
  for (const r of rows) (blocksConfirm(r) ? blocking : deservesLook(r) ? look : ready).push(r);
  const shownBlocking = blocking.slice(0, limit);
  const shownLook = look.slice(0, limit - shownBlocking.length);
  const shownReady = filter === 'attention' ? [] : ready.slice(0, limit - shownBlocking.length - shownLook.length);
  return {
    shown: [...shownBlocking, ...shownLook, ...shownReady].sort((a, b) => a.line - b.line),
    attention: blocking.length + look.length,
    hiddenBlocking: blocking.length - shownBlocking.length,
    hiddenReady: ready.length - shownReady.length,
  };
}

/** What a column means now: the target its select starts on in the mapping form. */
export function findColumnTarget(column: LabCsvColumn): LabCsvMappingTarget {
  if (column.kind === 'bottle' || column.kind === 'sampled' || column.kind === 'reported') return column.kind;
  if (column.kind === 'measurand' && column.code) return column.conversion === 'SUS210→KV100' ? 'SUS210' : column.code;
  return 'ignore';
}
