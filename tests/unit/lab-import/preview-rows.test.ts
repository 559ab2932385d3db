import { describe, expect, test } from 'vitest';
import {
  countLines,
  MAX_LAB_FILE_LINES,
  selectPreviewRows,
  tooManyLinesMessage,
  type PreviewRow,
} from '~/lib/lab-import/lab-import';

function row(line: number, kind: 'ready' | 'unknown' | 'decided-unknown' | 'warning'): PreviewRow {
  const matched = { kind: 'matched' as const, sampleId: 's', machineId: 'm', machineName: 'M', drawnOn: '2026-01-01' };
  return {
    line,
    bottle: `B${line}`,
    bottleNorm: `B${line}`,
    sampled: null,
    reported: null,
    readings: {},
    match: kind === 'ready' || kind === 'warning' ? matched : { kind: 'unknown', codeProblem: null },
    errors: [],
    warnings:
      kind === 'warning'
        ? [{ severity: 'warning', code: 'missing-bottle-code', row: line, column: 'Bottle', message: 'w' }]
        : [],
    decision: kind === 'unknown' ? null : kind === 'decided-unknown' ? { action: 'skip' } : { action: 'write' },
    needs: kind === 'unknown' ? 'choose' : null,
    written: false,
  };
}

describe('which preview rows are listed', () => {
  test('a file of 260,000 unknown bottles lists the first 200 and counts the rest, in one pass', () => {
    const rows = Array.from({ length: 260_000 }, (_, i) => row(i + 2, 'unknown'));
    const t = selectPreviewRows(rows, 'all');
    expect(t.shown.map((r) => r.line)).toEqual(Array.from({ length: 200 }, (_, i) => i + 2));
    expect(t).toMatchObject({ attention: 260_000, hiddenBlocking: 259_800, hiddenReady: 0 });
  });

  test.each([
    // filter, rows (kinds), listed lines, hidden blocking, hidden ready
    ['all', ['ready', 'unknown', 'ready', 'warning'], [3, 5], 0, 2],
    ['attention', ['ready', 'unknown', 'ready', 'warning'], [3, 5], 0, 2],
    ['all', ['ready', 'ready', 'ready', 'unknown'], [2, 5], 0, 2],
    // Decided rows step back so the next undecided ones come forward.
    ['all', ['decided-unknown', 'decided-unknown', 'unknown', 'unknown'], [4, 5], 0, 0],
    ['all', ['unknown', 'unknown', 'unknown', 'ready'], [2, 3], 1, 1],
  ] as const)(
    '%s of %j with room for 2 → %j, %d blocking and %d ready not listed',
    (filter, kinds, lines, hiddenBlocking, hiddenReady) => {
      const t = selectPreviewRows(
        kinds.map((k, i) => row(i + 2, k)),
        filter,
        2,
      );
      expect(t.shown.map((r) => r.line)).toEqual(lines);
      expect(t.hiddenBlocking).toBe(hiddenBlocking);
      expect(t.hiddenReady).toBe(hiddenReady);
    },
  );
});

describe('the line cap of a lab file', () => {
  test.each([
    ['', 0],
    ['a', 1],
    ['a\n', 1],
    ['a\nb', 2],
    ['a\nb\n', 2],
    ['\n\n', 2],
  ])('countLines(%j) = %d', (text, n) => {
    expect(countLines(text)).toBe(n);
  });

  test('the sentence names the file, its lines and the cap', () => {
    expect(tooManyLinesMessage('big.csv', 260_001)).toBe(
      `"big.csv" has 260,001 lines; one lab file may hold at most ${MAX_LAB_FILE_LINES.toLocaleString('en-GB')}. Split the report into smaller files and upload each.`,
    );
  });
});
