/**
 * Lines of a lab report that are page furniture, not bottles: footers ("Report generated …", "Page 2 of
 * 3"), the header row repeated at the top of each printed page (with its units row), and blank separator
 * lines. They are found before the rows are read, skipped, and each kind is named in one note.
 */
import type { CsvGrid, RowView } from './csv-grid';
import type { LabCsvIssue } from './lab-csv';

/** Words that open or fill a footer line, in English and the dictionary's languages (common usage). */
const FOOTER_WORDS =
  /\b(generated|printed|created|exported|end of report|page \d+|confidential|signed|approved|copyright|erstellt|gedruckt|seite \d+|vertraulich|généré|genere|imprimé|imprime|généré le|generado|impreso|página \d+|pagina \d+|generato|stampato|gegenereerd|afgedrukt|gerado|impresso|genererad|utskriven|sida \d+|fin du rapport|ende des berichts|fin del informe|fine del rapporto|einde rapport|fim do relatório|slut på rapporten)\b|©|\(c\)|https?:\/\/|www\./i;

export interface FurnitureInput {
  grid: CsvGrid;
  firstDataRow: number;
  headerCells: readonly string[];
  isUnitsRow: (cells: readonly string[]) => boolean;
}

export interface FurnitureResult {
  /** Indexes into `grid` of the rows to leave out. */
  skip: Set<number>;
  notes: LabCsvIssue[];
}

function filled(cells: readonly string[]): string[] {
  return cells.map((c) => c.trim()).filter((c) => c !== '');
}

/** Filled cells, counted up to `limit` (a footer has one or two: counting further is wasted on every data row). */
function countFilledCells(cells: readonly string[], limit: number): number {
  let n = 0;
  for (const cell of cells) {
    if (cell.length > 0 && cell.trim() !== '' && ++n >= limit) break;
  }
  return n;
}

function fold(text: string): string {
  // Printable ASCII without spaces folds to its lower case: NFKC leaves ASCII alone and there is no space to
  // squeeze. Most cells of a data row are such numbers and codes, and skip the normalisation and the regex.
  let plainAscii = true;
  for (let i = 0; i < text.length; i += 1) {
    const c = text.charCodeAt(i);
    if (c <= 32 || c >= 127) {
      plainAscii = false;
      break;
    }
  }
  if (plainAscii) return text.toLowerCase();
  return text.normalize('NFKC').trim().toLowerCase().replace(/\s+/g, ' ');
}

/** A header's filled cells folded once, with their positions, for isRepeatedHeader. */
function foldHeader(header: readonly string[]): { index: number; folded: string }[] {
  const out: { index: number; folded: string }[] = [];
  header.forEach((h, index) => {
    if (h.trim() !== '') out.push({ index, folded: fold(h) });
  });
  return out;
}

/** True when a row says the header again: at least two thirds of the header's filled cells, in place. */
export function isRepeatedHeader(cells: readonly string[], header: readonly string[]): boolean {
  return repeatsFoldedHeader(cells, foldHeader(header));
}

function repeatsFoldedHeader(cells: readonly string[], folded: readonly { index: number; folded: string }[]): boolean {
  const total = folded.length;
  if (total < 2) return false;
  // More than a third of the cells differing settles it: a data row stops after a few cells.
  const allowedMisses = total - Math.ceil((total * 2) / 3);
  let misses = 0;
  for (const { index, folded: h } of folded) {
    if (fold(cells[index] ?? '') !== h && ++misses > allowedMisses) return false;
  }
  return true;
}

/** fold(view.cell(i)) === folded, without making the cell's string when it is printable ASCII (fold lower-cases it). */
function foldsTo(view: RowView, i: number, folded: string): boolean {
  const text = view.source(i);
  const start = view.start(i);
  const end = view.end(i);
  if (end - start !== folded.length) {
    // A different length can still fold equal when the cell is not plain ASCII (NFKC, squeezed spaces).
    for (let k = start; k < end; k += 1) {
      const c = text.charCodeAt(k);
      if (c <= 32 || c >= 127) return fold(view.cell(i)) === folded;
    }
    return false;
  }
  for (let k = start; k < end; k += 1) {
    const c = text.charCodeAt(k);
    if (c <= 32 || c >= 127) return fold(view.cell(i)) === folded;
    // ASCII lower case: what toLowerCase does to A–Z, and nothing else in this range.
    if ((c >= 65 && c <= 90 ? c + 32 : c) !== folded.charCodeAt(k - start)) return false;
  }
  return true;
}

/** repeatsFoldedHeader over a row view. */
function viewRepeatsFoldedHeader(view: RowView, folded: readonly { index: number; folded: string }[]): boolean {
  const total = folded.length;
  if (total < 2) return false;
  const allowedMisses = total - Math.ceil((total * 2) / 3);
  let misses = 0;
  for (const { index, folded: h } of folded) {
    if (!foldsTo(view, index, h) && ++misses > allowedMisses) return false;
  }
  return true;
}

/** True when a row is a footer line: one or two filled cells reading like a sentence or a page mark. */
export function isFooterRow(cells: readonly string[], width: number): boolean {
  if (countFilledCells(cells, 3) > 2) return false;
  const parts = filled(cells);
  if (parts.length === 0 || parts.length > 2 || (parts.length === 2 && width <= 3)) return false;
  const text = parts.join(', ');
  if (text.length > 2000) return true;
  if (FOOTER_WORDS.test(text)) return true;
  // A lone cell of three or more words is a sentence, never a bottle code.
  return parts.length === 1 && width > 2 && (text.match(/\p{L}{2,}/gu)?.length ?? 0) >= 3 && /\s/.test(text);
}

function listLines(lines: readonly number[]): string {
  const shown = lines.slice(0, 8).join(', ');
  return lines.length > 8 ? `${shown} and ${lines.length - 8} more` : shown;
}

/**
 * Page furniture met row by row, in file order: `visit` says whether a row is to be skipped, and `notes` words one
 * note per kind. Blank lines count only when a filled row follows them (trailing blank lines are not separators).
 * The reader runs it inside its own loop over the rows, so a big file's rows are split once.
 */
export class PageFurnitureScanner {
  private readonly foldedHeader: { index: number; folded: string }[];
  private readonly footers: number[] = [];
  private readonly headers: number[] = [];
  private readonly blanks: number[] = [];
  private pendingBlanks: number[] = [];

  constructor(
    private readonly headerCells: readonly string[],
    private readonly isUnitsRow: (cells: readonly string[]) => boolean,
  ) {
    this.foldedHeader = foldHeader(headerCells);
  }

  /**
   * Look at row `r` of `grid`: 'skip' for a blank line or furniture, 'skip-next-too' for a repeated header with its
   * units row under it, 'read' for a row of readings.
   */
  visit(grid: CsvGrid, r: number): 'read' | 'skip' | 'skip-next-too' {
    const line = grid.lineOf(r);
    if (grid.isBlank(r)) {
      this.pendingBlanks.push(line);
      return 'skip';
    }
    if (this.pendingBlanks.length > 0) {
      this.blanks.push(...this.pendingBlanks);
      this.pendingBlanks = [];
    }
    const view = grid.view(r);
    if (!view) return 'skip';
    if (viewRepeatsFoldedHeader(view, this.foldedHeader)) {
      this.headers.push(line);
      const next = grid.row(r + 1);
      return next && !grid.isBlank(r + 1) && this.isUnitsRow(next) ? 'skip-next-too' : 'skip';
    }
    // A footer has one or two filled cells: a row of readings is passed over without making its cells.
    let filledCells = 0;
    for (let i = 0; i < view.length && filledCells < 3; i += 1) if (view.isFilled(i)) filledCells += 1;
    if (filledCells <= 2 && isFooterRow(grid.row(r) ?? [], this.headerCells.length)) {
      this.footers.push(line);
      return 'skip';
    }
    return 'read';
  }

  /** One note per kind of furniture met so far. */
  notes(): LabCsvIssue[] {
    const notes: LabCsvIssue[] = [];
    const note = (lines: number[], what: string): void => {
      if (lines.length === 0) return;
      const one = lines.length === 1;
      notes.push({
        severity: 'warning',
        code: 'lines-skipped',
        row: lines[0] ?? null,
        column: null,
        message: `${one ? 'Line' : 'Lines'} ${listLines(lines)}: ${what}; skipped, not read as ${one ? 'a bottle' : 'bottles'}.`,
      });
    };
    note(this.headers, 'the header row again (a page break)');
    note(this.footers, 'a footer or note, not readings');
    note(this.blanks, 'blank, between rows of readings');
    return notes;
  }
}

/** Find the furniture rows after the header, and word one note per kind. */
export function findPageFurniture(input: FurnitureInput): FurnitureResult {
  const { grid, firstDataRow } = input;
  const skip = new Set<number>();
  const scanner = new PageFurnitureScanner(input.headerCells, input.isUnitsRow);
  for (let r = firstDataRow; r < grid.length; r += 1) {
    const verdict = scanner.visit(grid, r);
    if (verdict === 'read') continue;
    skip.add(r);
    if (verdict === 'skip-next-too') {
      skip.add(r + 1);
      r += 1;
    }
  }
  return { skip, notes: scanner.notes() };
}
