// The request-side helpers of the lab import: pure, so they run without the database.
import { describe, expect, test } from 'vitest';
import { computeHeaderSignature, rowDecisionSchema } from '~/lib/lab-import/lab-import';
import { wantsPage } from '~/lib/http/form';
import { readColumnFields, readDecisionFields } from '~/lib/lab-import/lab-import.routes';
import { cleanFileName } from '~/lib/lab-import/lab-import.service';

const MACHINE = '0b6c7f4e-2f43-4a8e-9d2e-7a1c5e9f3b21';

describe('computeHeaderSignature', () => {
  test.each([
    [['Bottle', 'Fe', 'Al'], ['bottle', ' FE ', 'al'], true],
    [['Bottle', 'Fe', 'Al'], ['Bottle', 'Al', 'Fe'], false],
    [['Viscosity  40 °C'], ['viscosity 40 °C'], true],
    // NFKC folds the full-width letters some exports use.
    [['Ｆｅ'], ['Fe'], true],
  ])('%j and %j give the same signature: %s', (a, b, same) => {
    expect(computeHeaderSignature(a) === computeHeaderSignature(b)).toBe(same);
  });
});

describe('rowDecisionSchema', () => {
  test.each([
    ['write', { action: 'write' }],
    ['replace', { action: 'replace' }],
    ['skip', { action: 'skip' }],
    [`create:${MACHINE}`, { action: 'create', machineId: MACHINE }],
  ])('%s reads as %j', (raw, decision) => {
    expect(rowDecisionSchema.parse(raw)).toEqual(decision);
  });

  test.each(['delete', 'create:', 'create:not-a-uuid', 'WRITE', ''])('%j is refused', (raw) => {
    expect(rowDecisionSchema.safeParse(raw).success).toBe(false);
  });
});

describe('form fields', () => {
  test('row decisions by line, with a bad one named by its line', () => {
    const form = new URLSearchParams({
      'row.2': 'skip',
      'row.3': `create:${MACHINE}`,
      'row.4': 'explode',
      'row.5': '',
      other: 'x',
    });
    const { decisions, fields } = readDecisionFields(form);
    expect(decisions).toEqual({ 2: { action: 'skip' }, 3: { action: 'create', machineId: MACHINE } });
    expect(fields['row.4']).toMatch(/^Line 4:/);
    expect(Object.keys(fields)).toEqual(['row.4']);
  });

  test('column targets keep only known targets', () => {
    const form = new URLSearchParams({ 'col.0': 'bottle', 'col.3': 'Al', 'col.4': 'Unobtainium', 'col.x': 'Fe' });
    expect(readColumnFields(form)).toEqual({ 0: 'bottle', 3: 'Al' });
  });
});

describe('cleanFileName and wantsPage', () => {
  test.each([
    ['../../etc/passwd', 'passwd'],
    ['C:\\Users\\lab\\report.csv', 'report.csv'],
    ['re\u0000po\u001frt.csv', 'report.csv'],
    ['', 'lab-report.csv'],
    [`${'a'.repeat(300)}.csv`, 'a'.repeat(200)],
  ])('%j is kept as %j', (raw, clean) => {
    expect(cleanFileName(raw)).toBe(clean);
  });

  test.each([
    ['text/html,application/xhtml+xml,*/*;q=0.8', true],
    ['application/json', false],
    ['text/html, application/json', false],
    ['*/*', false],
  ])('Accept %j wants a page: %s', (accept, html) => {
    expect(wantsPage(new Request('http://local/', { headers: { accept } }))).toBe(html);
  });
});
