/**
 * One-row-per-test files: a bottle column, a test (element, parameter) column, a result column and often a
 * unit column, one line per bottle and test. They are pivoted into the wide shape the reader knows (one row
 * per bottle, one column per test, the units as a units row), so column recognition, qualifiers, unit
 * conversions, lab profiles, the preview and the confirm stay exactly those of a wide file.
 */
import { translateHeader } from './header-dictionary';
import { isUnitCell, type ColumnKind } from './column-recognition';
import type { LabCsvIssue } from './lab-csv';

const TEST_WORDS = new Set([
  'test',
  'tests',
  'parameter',
  'analyte',
  'element',
  'measurand',
  'determination',
  'property',
  'characteristic',
]);
const RESULT_WORDS = new Set(['result', 'results', 'value', 'reading', 'measured', 'measurement']);
const UNIT_WORDS = new Set(['unit', 'units', 'uom']);

function words(header: string): string[] {
  const text = translateHeader(header.normalize('NFKC').toLowerCase()).text;
  return text.split(/[^a-z0-9]+/).filter((w) => w !== '');
}

function isRole(header: string, set: ReadonlySet<string>): boolean {
  const ws = words(header);
  // "Test", "Test name", "Element", "Result value": short headers made of these words and "name"/"of".
  return (
    ws.length > 0 &&
    ws.length <= 3 &&
    ws.some((w) => set.has(w)) &&
    ws.every((w) => set.has(w) || w === 'name' || w === 'of' || w === 'code')
  );
}

export interface LongFormatPlan {
  bottle: number;
  test: number;
  result: number;
  unit: number | null;
  sampled: number | null;
  reported: number | null;
  /** Columns neither read nor pivoted (lab's own method or remark columns). */
  others: number[];
}

/**
 * Recognise a one-row-per-test header from the column kinds the reader found: a bottle column, one test
 * column, one result column, maybe one unit column, and no measurand column (a wide file has those).
 */
export function detectLongFormat(headerCells: readonly string[], kinds: readonly ColumnKind[]): LongFormatPlan | null {
  if (kinds.some((k) => k === 'measurand')) return null;
  const find = (set: ReadonlySet<string>): number[] =>
    headerCells.flatMap((h, i) => (kinds[i] === 'unknown' && isRole(h, set) ? [i] : []));
  const bottle = kinds.indexOf('bottle');
  const tests = find(TEST_WORDS);
  const results = find(RESULT_WORDS);
  const units = find(UNIT_WORDS);
  if (bottle === -1 || tests.length !== 1 || results.length !== 1 || units.length > 1) return null;
  const test = tests[0] ?? -1;
  const result = results[0] ?? -1;
  const unit = units[0] ?? null;
  const sampled = kinds.indexOf('sampled');
  const reported = kinds.indexOf('reported');
  const used = new Set([bottle, test, result, unit, sampled, reported]);
  const others = headerCells.flatMap((h, i) => (!used.has(i) && h.trim() !== '' && kinds[i] !== 'ignored' ? [i] : []));
  return {
    bottle,
    test,
    result,
    unit,
    sampled: sampled === -1 ? null : sampled,
    reported: reported === -1 ? null : reported,
    others,
  };
}

export interface PivotInput {
  plan: LongFormatPlan;
  headerCells: readonly string[];
  data: readonly (readonly string[])[];
  firstDataRow: number;
  lineOf: readonly number[];
  headerLine: number;
  /** Rows to leave out (page furniture, malformed lines). */
  skip: ReadonlySet<number>;
  normaliseBottle: (raw: string) => string;
}

export interface PivotResult {
  /** Row 0 is the header (bottle, dates, one column per test); each following row is one bottle. */
  grid: string[][];
  /** The units row under the header: one unit per test column. */
  units: string[];
  /** Line of each grid row: the header's, then the first line of each bottle. */
  lines: number[];
  issues: LabCsvIssue[];
  /** Which file line each test result came from, by `${bottle line}|${test header}`; first line of each test. */
  cellLines: Map<string, number>;
  testFirstLine: Map<string, number>;
}

interface BottleGroup {
  raw: string;
  line: number;
  sampled: string;
  reported: string;
  values: Map<string, { value: string; line: number }>;
  /** Tests named twice for this bottle: no value is kept for them. */
  doubled: Set<string>;
}

function testKey(name: string): string {
  return name.normalize('NFKC').trim().toLowerCase().replace(/\s+/g, ' ');
}

function quote(text: string): string {
  return `"${text.length > 40 ? `${text.slice(0, 37)}...` : text}"`;
}

/** Pivot the data rows of a one-row-per-test file into one row per bottle; see the module doc. */
export function pivotLongFormat(input: PivotInput): PivotResult {
  const { plan, headerCells, data, lineOf } = input;
  const issues: LabCsvIssue[] = [];
  const tests = new Map<string, { header: string; unit: string; unitLine: number; line: number }>();
  const bottles = new Map<string, BottleGroup>();
  const cell = (cells: readonly string[], i: number | null): string => (i === null ? '' : (cells[i] ?? '').trim());

  for (let r = input.firstDataRow; r < data.length; r += 1) {
    const cells = data[r];
    if (!cells || input.skip.has(r) || cells.every((c) => c.trim() === '')) continue;
    const line = lineOf[r] ?? r + 1;
    const bottleRaw = cell(cells, plan.bottle);
    const testName = cell(cells, plan.test);
    const result = cell(cells, plan.result);
    const unit = cell(cells, plan.unit);
    const testHeader = headerCells[plan.test]?.trim() || 'Test';
    if (bottleRaw === '') {
      issues.push({
        severity: 'error',
        code: 'missing-bottle-code',
        row: line,
        column: headerCells[plan.bottle] ?? null,
        message: `Line ${line}: the bottle code is blank, so this result${testName ? ` (${quote(testName)})` : ''} cannot be matched to a sample.`,
      });
      continue;
    }
    const norm = input.normaliseBottle(bottleRaw);
    let group = bottles.get(norm);
    if (!group) {
      group = { raw: bottleRaw, line, sampled: '', reported: '', values: new Map(), doubled: new Set() };
      bottles.set(norm, group);
    }
    group.sampled ||= cell(cells, plan.sampled);
    group.reported ||= cell(cells, plan.reported);
    if (testName === '') {
      issues.push({
        severity: 'error',
        code: 'missing-test',
        row: group.line,
        column: testHeader,
        message: `Line ${line}, column "${testHeader}": the test name is blank, so the result ${quote(result)} for bottle ${quote(bottleRaw)} cannot be placed. Fill in the test or remove the line.`,
      });
      continue;
    }
    const key = testKey(testName);
    let test = tests.get(key);
    if (!test) {
      test = { header: testName, unit, unitLine: line, line };
      tests.set(key, test);
    }
    if (unit !== '' && !isUnitCell(unit)) {
      issues.push({
        severity: 'error',
        code: 'unknown-unit',
        row: group.line,
        column: test.header,
        message: `Line ${line}: the unit ${quote(unit)} of ${quote(testName)} is not one Sumpwise reads (ppm, mg/kg, %, cSt, mm²/s, SUS, °C, °F, mg KOH/g), so the result is not read. Ask the lab for one of those, or remove the line.`,
      });
      group.doubled.add(key);
      continue;
    }
    if (testKey(unit) !== testKey(test.unit)) {
      issues.push({
        severity: 'error',
        code: 'mixed-units',
        row: group.line,
        column: test.header,
        message: `Line ${line}: ${quote(testName)} is given in ${unit ? quote(unit) : 'no unit'} here but in ${test.unit ? quote(test.unit) : 'no unit'} on line ${test.unitLine}. Each test is read in one unit per file; ask the lab for one unit, or split the file.`,
      });
      group.doubled.add(key);
      continue;
    }
    const earlier = group.values.get(key);
    if (earlier || group.doubled.has(key)) {
      issues.push({
        severity: 'error',
        code: 'duplicate-test',
        row: group.line,
        column: test.header,
        message: `Line ${line}: bottle ${quote(bottleRaw)} has ${quote(testName)} again${earlier ? ` (also on line ${earlier.line})` : ''}. One bottle gets one result per test; remove the repeated line or correct its bottle code.`,
      });
      group.values.delete(key);
      group.doubled.add(key);
      continue;
    }
    if (result === '') {
      issues.push({
        severity: 'error',
        code: 'missing-result',
        row: group.line,
        column: test.header,
        message: `Line ${line}: bottle ${quote(bottleRaw)} names the test ${quote(testName)} but its result is blank. Fill it in, write ND or - for "no result", or remove the line.`,
      });
      group.doubled.add(key);
      continue;
    }
    group.values.set(key, { value: cells[plan.result] ?? '', line });
  }

  const testKeys = [...tests.keys()];
  const header: string[] = [headerCells[plan.bottle] ?? 'Bottle'];
  const units: string[] = [''];
  if (plan.sampled !== null) {
    header.push(headerCells[plan.sampled] ?? 'Sampled');
    units.push('');
  }
  if (plan.reported !== null) {
    header.push(headerCells[plan.reported] ?? 'Reported');
    units.push('');
  }
  const testFirstLine = new Map<string, number>();
  for (const key of testKeys) {
    const t = tests.get(key);
    if (!t) continue;
    header.push(t.header);
    units.push(t.unit);
    testFirstLine.set(t.header, t.line);
  }
  const grid: string[][] = [header];
  const lines: number[] = [input.headerLine];
  const cellLines = new Map<string, number>();
  for (const group of bottles.values()) {
    const row: string[] = [group.raw];
    if (plan.sampled !== null) row.push(group.sampled);
    if (plan.reported !== null) row.push(group.reported);
    for (const key of testKeys) {
      const v = group.values.get(key);
      row.push(v?.value ?? '');
      const t = tests.get(key);
      if (v && t) cellLines.set(`${group.line}|${t.header}`, v.line);
    }
    grid.push(row);
    lines.push(group.line);
  }
  if (plan.others.length > 0) {
    const names = plan.others.map((i) => `"${headerCells[i]?.trim() ?? ''}"`).join(', ');
    issues.push({
      severity: 'warning',
      code: 'unknown-column',
      row: input.headerLine,
      column: null,
      message: `Line ${input.headerLine}: this file has one row per test; column${plan.others.length === 1 ? '' : 's'} ${names} ${plan.others.length === 1 ? 'is' : 'are'} not read.`,
    });
  }
  return { grid, units, lines, issues, cellLines, testFirstLine };
}

/**
 * Point the reader's messages about the pivoted grid back at the file: a cell problem names the line the
 * result came from, and an unrecognised test is worded as a test rather than a column.
 */
export function rewordPivotIssues(issues: LabCsvIssue[], from: number, pivot: PivotResult, headerLine: number): void {
  for (let i = from; i < issues.length; i += 1) {
    const issue = issues[i];
    if (!issue || issue.column === null) continue;
    const first = pivot.testFirstLine.get(issue.column);
    if (first === undefined) continue;
    if (issue.code === 'unknown-column' && issue.row === headerLine) {
      issues[i] = {
        ...issue,
        row: first,
        message: `Line ${first}: the test "${issue.column}" was not recognised. Its results are kept as text and not read as readings; a lab profile can map it.`,
      };
      continue;
    }
    if (issue.row === null) continue;
    const line = pivot.cellLines.get(`${issue.row}|${issue.column}`);
    const prefix = `Line ${issue.row}, column "${issue.column}"`;
    if (line !== undefined && issue.message.startsWith(prefix)) {
      issues[i] = { ...issue, message: `Line ${line}, test "${issue.column}"${issue.message.slice(prefix.length)}` };
    }
  }
}
