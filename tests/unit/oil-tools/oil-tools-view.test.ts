import { describe, expect, test } from 'vitest';
import { buildOilToolsView, formatToolFigure, runSuitsCheck, type ToolMachine } from '~/lib/oil-tools/oil-tools-view';

// An invented manual chart (no published source): 10W-40 from −10 to 35 °C.
const machines: ToolMachine[] = [
  { id: 'm1', name: 'Trail 300', recommendedGrades: [{ grade: '10W-40', minC: -10, maxC: 35 }] },
  { id: 'm2', name: 'Old twin', recommendedGrades: [] },
];
const q = (o: Record<string, string>) => new URLSearchParams(o);

describe('runSuitsCheck', () => {
  test.each<[string, Record<string, string>, Record<string, string>]>([
    [
      'unknown machine',
      { machine: 'other', grade: '10W-40', low: '0', high: '30' },
      { machine: 'Pick one of your crew’s machines.' },
    ],
    [
      'no chart yet',
      { machine: 'm2', grade: '10W-40', low: '0', high: '30' },
      { machine: 'This machine has no temperature chart from its manual yet; add it on the machine’s page.' },
    ],
    ['no grade', { machine: 'm1', grade: ' ', low: '0', high: '30' }, { grade: 'Enter the grade, such as 10W-40.' }],
    [
      'temperatures not numbers',
      { machine: 'm1', grade: '10W-40', low: 'cold', high: '' },
      {
        low: 'Enter the coldest riding temperature as a number.',
        high: 'Enter the hottest riding temperature as a number.',
      },
    ],
  ])('%s → the message beside the field', (_name, form, fields) => {
    expect(runSuitsCheck(q({ tool: 'suits', ...form }), 'C', machines)).toEqual({ state: 'error', fields });
  });

  test.each<[string, string, string, 'C' | 'F', boolean]>([
    ['inside the chart', '0', '30', 'C', true],
    ['hotter than the chart', '0', '40', 'C', false],
    ['in °F, inside (32 to 86 °F is 0 to 30 °C)', '32', '86', 'F', true],
  ])('%s', (_name, low, high, unit, suits) => {
    const r = runSuitsCheck(q({ tool: 'suits', machine: 'm1', grade: '10W-40', low, high }), unit, machines);
    expect(r.state).toBe('ok');
    if (r.state === 'ok') expect([r.machine, r.result.suits]).toEqual(['Trail 300', suits]);
  });

  test('another tool leaves the check idle', () => {
    expect(runSuitsCheck(q({ tool: 'vi', machine: 'm1' }), 'C', machines)).toEqual({ state: 'idle' });
  });
});

describe('buildOilToolsView', () => {
  test('only the tool that was sent keeps its values and shows its errors', () => {
    const v = buildOilToolsView(q({ tool: 'vi', kv40: '100', kv100: '' }), 'F', machines);
    expect([v.valueOf('kv40', 'vi'), v.valueOf('kv40', 'at'), v.deg]).toEqual(['100', '', '°F']);
    expect(v.errorOf(v.vi, 'kv100')).toBeTruthy();
    expect(v.errorOf(v.at, 'kv100')).toBeUndefined();
  });

  test.each<[number, number, string]>([
    [1234.567, 2, '1,234.57'],
    [12.3, 1, '12.3'],
    [5, 2, '5'],
  ])('formatToolFigure(%d, %d) → %s', (n, d, shown) => {
    expect(formatToolFigure(n, d)).toBe(shown);
  });
});
