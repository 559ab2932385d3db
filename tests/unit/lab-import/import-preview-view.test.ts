import { describe, expect, test } from 'vitest';
import type { LabCsvColumn } from '~/lib/lab-csv/lab-csv';
import {
  describeMappingTarget,
  formatDecisionField,
  type ImportPreview,
  type PreviewRow,
  type RowDecision,
} from '~/lib/lab-import/lab-import';
import {
  buildPreviewView,
  decisionValue,
  describeColumnReading,
  describeRowReadings,
  formatFileFigure,
  formatPreviewReading,
  rowChoices,
} from '~/lib/lab-import/import-preview-view';

const MACHINES = [
  { id: 'm1', name: 'Trail 450' },
  { id: 'm2', name: 'Road twin' },
];
const matched = {
  kind: 'matched' as const,
  sampleId: 's1',
  machineId: 'm1',
  machineName: 'Trail 450',
  drawnOn: '2026-02-01',
};
const withResults = { ...matched, kind: 'has-results' as const, existing: 12 };
const unknown = { kind: 'unknown' as const, codeProblem: null };
const error = {
  severity: 'error' as const,
  code: 'ragged-row' as const,
  row: 2,
  column: null,
  message: 'Line 2: too few cells.',
};
const warning = {
  severity: 'warning' as const,
  code: 'ragged-row' as const,
  row: 2,
  column: null,
  message: 'Line 2: a note.',
};

function row(over: Partial<PreviewRow> = {}): PreviewRow {
  return {
    line: 2,
    bottle: 'SW-1',
    bottleNorm: 'SW1',
    sampled: null,
    reported: null,
    readings: {},
    match: matched,
    errors: [],
    warnings: [],
    decision: { action: 'write' },
    needs: null,
    written: false,
    ...over,
  };
}

function preview(over: Partial<ImportPreview> = {}): ImportPreview {
  return {
    file: {
      id: 'f1',
      fileName: 'march-results.csv',
      sha256: 'x',
      byteSize: 10,
      uploadedAt: new Date('2026-03-04T05:06:07Z'),
      uploadedBy: 'u',
      importId: null,
    },
    columns: [],
    headers: [],
    headerSignature: '',
    sheet: null,
    profile: null,
    fileIssues: [],
    rows: [row()],
    newOilRows: [],
    machines: MACHINES,
    counts: { rows: 1, ready: 1, skipped: 0, blocked: 0, readings: 3 },
    canConfirm: true,
    ...over,
  } as ImportPreview;
}

describe('figures and readings as the preview lists them', () => {
  // Two decimals below 100, one from 100 (the preview shows the file nearly as written): common practice.
  test.each([
    [0, '0'],
    [4, '4'],
    [0.125, '0.13'],
    [12.345, '12.35'],
    [99.999, '100'],
    [123.45, '123.5'],
    [1100, '1100'],
    [-2.5, '-2.5'],
  ])('%d → %s', (v, text) => expect(formatFileFigure(v)).toBe(text));

  test.each([
    [undefined, ''],
    [{ value: 0, qualifier: '<' }, 'ND'],
    [{ value: 1, qualifier: '<' }, '<1'],
    [{ value: 900, qualifier: '>' }, '>900'],
    [{ value: 12.5 }, '12.5'],
  ] as const)('%o → "%s"', (reading, text) => expect(formatPreviewReading(reading)).toBe(text));

  test('at most eight readings are listed, in file order', () => {
    const readings = Object.fromEntries(
      ['Fe', 'Cu', 'Pb', 'Al', 'Cr', 'Sn', 'Si', 'Na', 'K'].map((c, i) => [c, { value: i + 1 }]),
    );
    expect(describeRowReadings(readings)).toBe('Fe 1 · Cu 2 · Pb 3 · Al 4 · Cr 5 · Sn 6 · Si 7 · Na 8');
  });
});

describe('decisions and choices', () => {
  test.each([
    [null, ''],
    [{ action: 'write' }, 'write'],
    [{ action: 'skip' }, 'skip'],
    [{ action: 'create', machineId: 'm2' }, 'create:m2'],
  ] as [RowDecision | null, string][])('%o is the select value "%s"', (d, value) =>
    expect(decisionValue(d)).toBe(value),
  );

  test.each([
    ['matched, decided', row(), ['write', 'skip'], 'write'],
    ['with results, undecided', row({ match: withResults, decision: null }), ['', 'replace', 'skip'], ''],
    [
      'unknown, created on m2',
      row({ match: unknown, decision: { action: 'create', machineId: 'm2' } }),
      ['create:m1', 'create:m2', 'skip'],
      'create:m2',
    ],
    ['in error, skipped', row({ errors: [error], decision: { action: 'skip' } }), ['', 'skip'], 'skip'],
  ] as const)('%s: choices %j, %s selected', (_what, r, values, selected) => {
    const choices = rowChoices(r, MACHINES);
    expect(choices.map((c) => c.value)).toEqual(values);
    expect(choices.filter((c) => c.selected).map((c) => c.value)).toEqual([selected]);
  });
});

describe('columns', () => {
  test.each([
    [{ index: 0, header: 'Bottle', kind: 'bottle' }, describeMappingTarget('bottle')],
    [{ index: 4, header: 'Fe', kind: 'measurand', code: 'Fe' }, describeMappingTarget('Fe')],
    [
      { index: 5, header: 'SUS 210F', kind: 'measurand', code: 'KV100', conversion: 'SUS210→KV100' },
      `${describeMappingTarget('SUS210')} (converted SUS210→KV100)`,
    ],
    [{ index: 1, header: 'X', kind: 'unknown' }, 'Not recognised'],
    [{ index: 2, header: 'Lab no', kind: 'ignored', note: 'the lab’s own number' }, 'Ignored: the lab’s own number'],
    [{ index: 3, header: 'Lab no', kind: 'ignored' }, 'Ignored'],
  ] as [LabCsvColumn, string][])('%o reads as "%s"', (column, text) => {
    expect(describeColumnReading(column)).toBe(text);
  });
});

describe('the preview page model', () => {
  test('a file waiting for choices: rows, links of the filter, the confirm label and the profile name', () => {
    const v = buildPreviewView({ labFileId: 'f 1', preview: preview(), decisions: {}, fields: {}, filter: 'all' });
    expect(v).toMatchObject({
      imported: false,
      uploadedAt: '4 Mar 2026, 05:06',
      profileName: 'march-results',
      profileOpen: false,
      filterHref: { all: '/imports/f%201#rows-h', attention: '/imports/f%201?rows=attention#rows-h' },
      confirmLabel: 'Confirm import: 1 sample, 3 readings',
      blockedRows: '0 rows',
      blockedVerb: 'need',
    });
    expect(v.rows[0]).toMatchObject({
      line: 2,
      sample: { kind: 'text', text: 'Trail 450 · drawn 1 Feb 2026', existing: null },
      readings: '—',
      messagesId: null,
    });
  });

  test('a row with an error, a missing choice and a note lists all three, and its choice travels when not listed', () => {
    const r = row({
      line: 3,
      match: unknown,
      decision: null,
      needs: 'Choose a machine or skip.',
      warnings: [warning],
      errors: [],
    });
    const v = buildPreviewView({
      labFileId: 'f1',
      preview: preview({ rows: [r], counts: { rows: 1, ready: 0, skipped: 0, blocked: 1, readings: 0 } }),
      decisions: { 9: { action: 'skip' } },
      fields: { profileName: 'Too long' },
      filter: 'attention',
      profileName: 'typed',
    });
    expect(v.rows[0]!.messages).toEqual([
      { tone: 'error', text: 'Choose a machine or skip.' },
      { tone: 'note', text: 'Line 2: a note.' },
    ]);
    expect(v.rows[0]).toMatchObject({ needsChoice: true, messagesId: 'row-3-msg', sample: { kind: 'unknown' } });
    expect(v.carried).toEqual([{ name: formatDecisionField(9), value: 'skip' }]);
    expect(v).toMatchObject({ blockedRows: '1 row', blockedVerb: 'needs', profileOpen: true, profileName: 'typed' });
  });

  test('an imported file links the samples written and says which rows were', () => {
    const rows = [row({ written: true }), row({ line: 3, bottle: 'X9', match: unknown, decision: { action: 'skip' } })];
    const v = buildPreviewView({
      labFileId: 'f1',
      preview: preview({ rows, file: { ...preview().file, importId: 'i1' } }),
      decisions: {},
      fields: {},
      filter: 'all',
    });
    expect(v).toMatchObject({
      imported: true,
      writtenRows: 1,
      notWrittenRows: 1,
      writtenLinks: [{ href: '/samples/s1', text: 'Bottle SW-1 · Trail 450 · 1 Feb 2026' }],
    });
    expect(v.rows.map((x) => [x.sample, x.result, x.choices.length])).toEqual([
      [{ kind: 'link', href: '/samples/s1', text: 'Trail 450 · drawn 1 Feb 2026' }, '✓ Written', 0],
      [{ kind: 'none', text: 'No sample' }, '– Not written', 0],
    ]);
  });
});
