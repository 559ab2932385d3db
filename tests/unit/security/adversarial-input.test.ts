// Every parser that sees user input answers a hostile 100 KB string in linear time. A pattern with nested or
// neighbouring overlapping quantifiers takes seconds on these strings (a grade of "10W", 2,000 spaces and an
// "x" took 1.8 s before), so a 50 ms bound per call separates linear from super-linear with a wide margin.
// Each call is timed as the best of three so that a garbage-collection pause on a busy machine is not read
// as a slow pattern; a super-linear pattern is slow every time.
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { findGradeWindow } from '~/lib/analysis/viscosity';
import { parseDateCell, parseGlycolCell, parseReadingCell } from '~/lib/lab-csv/cell-values';
import { isUnitCell, recogniseHeader } from '~/lib/lab-csv/column-recognition';
import { parseLabCsv } from '~/lib/lab-csv/lab-csv';
import { parseSaeGrade } from '~/lib/oil-changes/sae-grade';
import { explainIssuedCode, normaliseBottleCode } from '~/lib/samples/bottle-code';
import { safeNextPath } from '~/lib/http/form';

const KB100 = 100 * 1024;
/** The bound the adversarial strings must meet, per call. */
const BOUND_MS = 50;

/** Best of three wall-clock times of one call, in ms. */
function bestOfThree(run: () => unknown): number {
  let best = Infinity;
  for (let i = 0; i < 3; i++) {
    const t = performance.now();
    run();
    best = Math.min(best, performance.now() - t);
  }
  return best;
}

const fill = (prefix: string, unit: string, suffix: string, size = KB100) =>
  prefix + unit.repeat(Math.ceil((size - prefix.length - suffix.length) / unit.length)) + suffix;

// Prefixes that lead each pattern into its quantified parts, repeated units that those parts can share, and a
// suffix that makes the match fail at the very end (the worst case for backtracking).
const SHAPES: ReadonlyArray<readonly [string, string, string, string]> = [
  ['10W + spaces + x', '10W', ' ', 'x'],
  ['SAE + spaces + x', 'SAE', ' ', 'x'],
  ['10W + tabs + dash', '10W', '\t', '-x'],
  ['ND ( + spaces + (', 'nd (', ' ', '('],
  ['ND + " 1" + (', 'nd ', ' 1', '('],
  ['< + spaces + newline', '<', ' ', '\n'],
  ['digits + x', '', '1', 'x'],
  ['digits with commas + x', '1', ',1', 'x'],
  ['digits with points + x', '1', '.1', 'x'],
  ['mm + spaces + x', 'visc mm', ' ', 'x'],
  ['40 + spaces + x', 'viscosity 40', ' ', 'x'],
  ['"40 " repeated', '', '40 ', ''],
  ['date separators', '3', ' /', 'x'],
  ['month + spaces', 'apr', ' ', 'x'],
  ['dashes and dots', 'K7M', '-.', '!'],
  ['slashes and backslashes', '/', '/\\', ''],
];

const ADVERSARIAL: ReadonlyArray<readonly [string, string]> = SHAPES.map(([label, prefix, unit, suffix]) => [
  label,
  fill(prefix, unit, suffix),
]);

const PARSERS: ReadonlyArray<readonly [string, (s: string) => unknown]> = [
  ['oil tools grade parser (findGradeWindow)', findGradeWindow],
  ['oil-change SAE grade parser (parseSaeGrade)', parseSaeGrade],
  ['lab reading cell, decimal point', (s) => parseReadingCell(s, '.')],
  ['lab reading cell, decimal comma', (s) => parseReadingCell(s, ',')],
  ['lab date cell', parseDateCell],
  ['lab glycol cell', parseGlycolCell],
  ['lab header recognition', (s) => recogniseHeader(s)],
  ['lab header with units cell', (s) => recogniseHeader('Viscosity', s)],
  ['lab units row cell', isUnitCell],
  ['bottle code normal form', normaliseBottleCode],
  ['issued bottle code check', explainIssuedCode],
  ['next path after sign-in', safeNextPath],
];

describe(`each parser answers a 100 KB adversarial string within ${BOUND_MS} ms`, () => {
  // Growing sizes, so a super-linear pattern fails on a small string instead of hanging on the largest.
  test.each(
    PARSERS.flatMap(([name, parse]) => SHAPES.map(([label, ...shape]) => [name, label, parse, shape] as const)),
  )('%s: %s', (_name, _label, parse, [prefix, unit, suffix]) => {
    for (const size of [1024, 8 * 1024, KB100]) {
      const text = fill(prefix, unit, suffix, size);
      expect(text.length).toBeGreaterThanOrEqual(size);
      const ms = bestOfThree(() => parse(text));
      expect(ms, `${size} characters took ${ms.toFixed(1)} ms`).toBeLessThan(BOUND_MS);
    }
  });
});

describe('the answers to hostile input are clear refusals, not guesses', () => {
  test.each([
    ['10W + spaces + 40', fill('10W', ' ', '40')],
    ['spaces + 30', fill('', ' ', '30')],
  ])('grade "%s" of 100 KB is no grade', (_label, text) => {
    expect(findGradeWindow(text)).toBeNull();
    const sae = parseSaeGrade(text);
    expect(sae.ok).toBe(false);
    if (!sae.ok) expect(sae.message).toMatch(/^An SAE grade name is short/);
  });

  test('grades people really type still read', () => {
    expect(findGradeWindow(' SAE 10W - 40 ')?.grade).toBe('10W-40');
    expect(parseSaeGrade('sae 10w 40')).toEqual({ ok: true, grade: '10W-40' });
    expect(parseSaeGrade('20W–50')).toEqual({ ok: true, grade: '20W-50' });
  });

  test.each([
    ['ND (<0.5)', 0.5],
    ['nd ( < 1 )', 1],
    ['BDL 1 234', 1234],
    ['below detection limit (<2)', 2],
  ])('not-detected cell %j keeps its limit %d', (cell, limit) => {
    expect(parseReadingCell(cell, '.')).toEqual({ status: 'ok', value: limit, qualifier: '<', belowDetection: true });
  });

  test('a reading cell longer than any real one is not a number, and the message shows only its start', () => {
    const r = parseReadingCell(fill('1', ' ', 'x'), '.');
    expect(r).toMatchObject({ status: 'problem', problem: 'not-a-number' });
    if (r.status === 'problem') expect(r.detail.length).toBeLessThan(30);
  });
});

// Strings built from the pieces the patterns care about, so the property explores their corners.
const PIECES = [
  ' ',
  '\t',
  '\n',
  '\r',
  '1',
  '0',
  '40',
  '100',
  'W',
  'w',
  '-',
  '–',
  '.',
  ',',
  '(',
  ')',
  '<',
  '>',
  'nd',
  'SAE',
  'mm',
  '^2',
  '/s',
  'cSt',
  '°C',
  'deg',
  'ppm',
  '"',
  ';',
  'Bottle',
  'Fe',
  'apr',
  '2026',
  '\u00a0',
  '·',
  '/',
  '\\',
  '%2F',
  '=',
];
const hostile = fc.oneof(
  fc.string({ maxLength: 400 }),
  fc.string({ unit: 'grapheme', maxLength: 200 }),
  fc.array(fc.constantFrom(...PIECES), { maxLength: 400 }).map((parts) => parts.join('')),
);

/** Bound for one call in the property: generous for a busy shared machine, far below a super-linear blow-up. */
const PROPERTY_BOUND_MS = 50;

describe('any string gets an answer within the bound and nothing throws (fast-check)', () => {
  test.each(PARSERS)('%s', (_name, parse) => {
    fc.assert(
      fc.property(hostile, (text) => {
        let threw: unknown = null;
        const ms = bestOfThree(() => {
          try {
            parse(text);
          } catch (error) {
            threw = error;
          }
        });
        return threw === null && ms < PROPERTY_BOUND_MS;
      }),
      { numRuns: 300, seed: 17_2026 },
    );
  });

  test('the lab CSV reader returns a result with rows or clear errors, never throws, within 1 s per file', () => {
    const csv = fc
      .array(
        fc.array(hostile, { maxLength: 8 }).map((cells) => cells.join(',')),
        { maxLength: 40 },
      )
      .map((lines) => ['Bottle,Fe,Sampled', ...lines].join('\n'));
    fc.assert(
      fc.property(fc.oneof(csv, hostile), (text) => {
        const t = performance.now();
        const result = parseLabCsv(text);
        const ms = performance.now() - t;
        // Either rows were read or the reader said why not, in sentences.
        const answered = result.rows.length > 0 || result.errors.length > 0;
        return answered && result.errors.every((e) => e.message.length > 10) && ms < 1_000;
      }),
      { numRuns: 200, seed: 17_2026 },
    );
  });

  test('a 100 KB hostile header or cell through the whole lab CSV reader is answered within 1 s', () => {
    for (const [, text] of ADVERSARIAL) {
      for (const file of [
        `Bottle,${text.replace(/[\n\r",]/g, ' ')}\nA1,1\n`,
        `Bottle,Fe\nA1,${text.replace(/[\n\r",]/g, ' ')}\n`,
      ]) {
        const t = performance.now();
        const result = parseLabCsv(file);
        expect(performance.now() - t).toBeLessThan(1_000);
        expect(result.errors.length).toBeGreaterThan(0);
      }
    }
  });
});
