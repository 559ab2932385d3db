/**
 * The rows of a lab CSV as cells, read one row at a time.
 *
 * A 10,000-row report is 300,000 cells. Split all at once (papaparse's `data`), every cell string lives until
 * the last row is read, and the garbage collector spends a third of the reader's time moving them into the old
 * generation. A text without a single quote character has no quoted field, so its rows are exactly its lines
 * split at the delimiter: such a text is kept as line offsets, and a row's cells are made only when asked for,
 * and die young. A text with a quote anywhere goes through papaparse as a whole, as before.
 */
import Papa from 'papaparse';

export interface CsvGridError {
  /** Index of the row the error is in. */
  row: number;
  code: string;
  message: string;
}

/** Rows of cells by index; `row` may build the cells afresh on each call, so callers keep what they need. */
export interface CsvGrid {
  readonly length: number;
  row(r: number): readonly string[] | undefined;
  /** True when the row is missing or every cell holds nothing but white space. */
  isBlank(r: number): boolean;
  /** 1-based line of the file where row `r` starts (a quoted field may span lines). */
  lineOf(r: number): number;
  /**
   * Row `r` as a view of where its cells lie, read without making a string per cell. The view is reused: it is
   * valid until the next call to `view`. Undefined when there is no such row.
   */
  view(r: number): RowView | undefined;
}

/**
 * The cells of one row as ranges of a source text: cell i is `source(i).slice(start(i), end(i))`. Cells past the
 * last are empty, as `cells[i] ?? ''` reads them.
 */
export interface RowView {
  readonly length: number;
  cell(i: number): string;
  source(i: number): string;
  start(i: number): number;
  end(i: number): number;
  /** True when cell i holds more than white space. */
  isFilled(i: number): boolean;
}

/** True when `text` from `start` to `end` holds a character other than white space (String.prototype.trim's set). */
export function hasTextBetween(text: string, start: number, end: number): boolean {
  for (let i = start; i < end; i += 1) {
    const c = text.charCodeAt(i);
    // Printable ASCII other than the space is filled; anything else is asked of the white-space class.
    if ((c > 32 && c < 127) || !WHITE_SPACE.test(text[i]!)) return true;
  }
  return false;
}

/** A view over cells already split. */
class ArrayRowView implements RowView {
  cells: readonly string[] = [];
  get length(): number {
    return this.cells.length;
  }
  cell(i: number): string {
    return this.cells[i] ?? '';
  }
  source(i: number): string {
    return this.cells[i] ?? '';
  }
  start(): number {
    return 0;
  }
  end(i: number): number {
    return this.cells[i]?.length ?? 0;
  }
  isFilled(i: number): boolean {
    const cell = this.cells[i];
    return cell !== undefined && hasTextBetween(cell, 0, cell.length);
  }
}

/** A view over one line of a quote-free text: where each cell starts, and the delimiter after it. */
class LineRowView implements RowView {
  length = 0;
  /** starts[i] is where cell i begins; starts[i + 1] - 1 where it ends (one past the end for the last). */
  starts = new Int32Array(64);
  constructor(private readonly body: string) {}
  cell(i: number): string {
    return i < this.length ? this.body.slice(this.starts[i], this.starts[i + 1]! - 1) : '';
  }
  source(): string {
    return this.body;
  }
  start(i: number): number {
    return i < this.length ? this.starts[i]! : 0;
  }
  end(i: number): number {
    return i < this.length ? this.starts[i + 1]! - 1 : 0;
  }
  isFilled(i: number): boolean {
    return i < this.length && hasTextBetween(this.body, this.starts[i]!, this.starts[i + 1]! - 1);
  }
}

export interface CsvGridResult {
  grid: CsvGrid;
  errors: CsvGridError[];
  /** Which reader split the text: 'lines' (no quote character anywhere) or 'papaparse'. */
  splitter: 'lines' | 'papaparse';
}

export type CsvSplitter = 'auto' | 'papaparse';

const WHITE_SPACE = /\s/;

/** True when every cell is empty or white space (String.prototype.trim's set, which /\s/ matches exactly). */
function cellsBlank(cells: readonly string[]): boolean {
  for (const cell of cells) if (cell.length > 0 && cell.trim() !== '') return false;
  return true;
}

/** A grid over rows already split (papaparse's output, or a pivoted long-format file). */
export function arrayGrid(rows: readonly (readonly string[])[], lines?: readonly number[]): CsvGrid {
  const view = new ArrayRowView();
  return {
    view: (r) => {
      const cells = rows[r];
      if (!cells) return undefined;
      view.cells = cells;
      return view;
    },
    length: rows.length,
    row: (r) => rows[r],
    isBlank: (r) => {
      const cells = rows[r];
      return !cells || cellsBlank(cells);
    },
    lineOf: (r) => lines?.[r] ?? r + 1,
  };
}

/** Rows that are the lines of a text without quote characters, split at `delimiter` on demand. */
class LineGrid implements CsvGrid {
  readonly length: number;
  private readonly starts: number[] = [];
  private lastIndex = -1;
  private lastCells: string[] = [];
  private readonly rowView: LineRowView;
  private viewIndex = -1;

  constructor(
    private readonly body: string,
    private readonly delimiter: string,
  ) {
    // papaparse splits such a text at every newline, so a trailing newline gives a last row of one empty cell.
    this.starts.push(0);
    for (let i = body.indexOf('\n'); i !== -1; i = body.indexOf('\n', i + 1)) this.starts.push(i + 1);
    this.length = this.starts.length;
    this.rowView = new LineRowView(body);
  }

  view(r: number): RowView | undefined {
    if (r < 0 || r >= this.length) return undefined;
    const view = this.rowView;
    if (r === this.viewIndex) return view;
    this.viewIndex = r;
    const delimiter = this.delimiter;
    const end = this.end(r);
    let count = 0;
    let at = this.starts[r]!;
    for (;;) {
      if (count + 2 > view.starts.length) {
        const grown = new Int32Array(view.starts.length * 2);
        grown.set(view.starts);
        view.starts = grown;
      }
      view.starts[count] = at;
      count += 1;
      const next = this.body.indexOf(delimiter, at);
      if (next === -1 || next >= end) break;
      at = next + 1;
    }
    // One past the last cell's end, as if a delimiter followed it.
    view.starts[count] = end + 1;
    view.length = count;
    return view;
  }

  private end(r: number): number {
    return r + 1 < this.length ? this.starts[r + 1]! - 1 : this.body.length;
  }

  row(r: number): readonly string[] | undefined {
    if (r < 0 || r >= this.length) return undefined;
    // Page-furniture checks look at a row and then its successor: one row is kept.
    if (r !== this.lastIndex) {
      this.lastCells = this.body.slice(this.starts[r], this.end(r)).split(this.delimiter);
      this.lastIndex = r;
    }
    return this.lastCells;
  }

  isBlank(r: number): boolean {
    if (r < 0 || r >= this.length) return true;
    const delimiter = this.delimiter.charCodeAt(0);
    for (let i = this.starts[r]!, end = this.end(r); i < end; i += 1) {
      const c = this.body.charCodeAt(i);
      if (c !== delimiter && hasTextBetween(this.body, i, i + 1)) return false;
    }
    return true;
  }

  lineOf(r: number): number {
    return r + 1;
  }
}

/**
 * Split `body` (newlines already "\n") into rows of cells at `delimiter`. With `splitter: 'papaparse'` the text
 * always goes through papaparse; the result is the same either way (tests/unit/lab-csv/csv-grid.test.ts).
 */
export function readCsvGrid(body: string, delimiter: string, splitter: CsvSplitter = 'auto'): CsvGridResult {
  if (splitter === 'auto' && !body.includes('"')) {
    return { grid: new LineGrid(body, delimiter), errors: [], splitter: 'lines' };
  }
  const parsed = Papa.parse<string[]>(body, { delimiter, newline: '\n', skipEmptyLines: false });
  const data = parsed.data;
  // 1-based line where each parsed row starts; a quoted field may span lines.
  const lines = new Array<number>(data.length);
  let nextLine = 1;
  for (let r = 0; r < data.length; r += 1) {
    lines[r] = nextLine;
    nextLine += 1;
    for (const cell of data[r] ?? []) {
      for (let i = cell.indexOf('\n'); i !== -1; i = cell.indexOf('\n', i + 1)) nextLine += 1;
    }
  }
  const errors: CsvGridError[] = [];
  for (const e of parsed.errors) {
    if (e.row === undefined || e.row === null) continue;
    errors.push({ row: e.row, code: e.code, message: e.message });
  }
  return { grid: arrayGrid(data, lines), errors, splitter: 'papaparse' };
}
