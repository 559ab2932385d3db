import { describe, expect, test } from 'vitest';
import { findRuleDefinition } from '~/lib/analysis';
import {
  buildFindingsView,
  describeReadingBand,
  showReading,
  type StoredFinding,
  type StoredReading,
  type StoredSampleBand,
} from '~/lib/findings/findings-view';

// Invented readings and findings; the rule ids and measurand groups are the engine's own.
const sample = { id: 's1', state: 'results_in' as const, distanceOnOil: 3000, meter: 'km' as const };
const reading = (measurand: string, value: number, qualifier: string | null = null): StoredReading => ({
  measurand,
  value,
  qualifier,
});
const finding = (
  id: string,
  ruleId: string,
  level: StoredFinding['level'],
  measurand: string | null,
  numbers: Record<string, unknown> = {},
): StoredFinding => ({
  id,
  ruleId,
  level,
  measurand,
  numbers,
  sentence: `${ruleId} ${measurand}`,
});
const band = (measurand: string, over: Partial<StoredSampleBand> = {}): StoredSampleBand => ({
  measurand,
  basis: 'rate',
  n: 5,
  mean: 10,
  watchAbove: 14,
  actFrom: 18,
  toReported: 1,
  source: 'own',
  sourceLabel: null,
  sourceMachines: null,
  ...over,
});
const view = (readings: StoredReading[], findings: StoredFinding[], bands: StoredSampleBand[] = []) =>
  buildFindingsView({ sample, readings, findings, bands });
const coolant = (level: StoredFinding['level']) => finding('c', 'coolant-markers', level, 'Na', { Na: 40, K: 30 });

describe('buildFindingsView: one card per story', () => {
  test.each<[string, StoredFinding[], string[], string[]]>([
    [
      'a finding about one reading at no higher level folds under the coolant story',
      [coolant('watch'), finding('k', 'fixed-limit', 'watch', 'K')],
      ['coolant-markers'],
      ['fixed-limit'],
    ],
    [
      'a higher level stands alone',
      [coolant('watch'), finding('k', 'fixed-limit', 'act', 'K')],
      ['fixed-limit', 'coolant-markers'],
      [],
    ],
    [
      'a reading the story does not name stands alone',
      [coolant('act'), finding('f', 'baseline-jump', 'watch', 'Fe')],
      ['coolant-markers', 'baseline-jump'],
      [],
    ],
  ])('%s', (_name, findings, stories, folded) => {
    const v = view([reading('Na', 40), reading('K', 30), reading('Fe', 12)], findings);
    expect(v.stories.map((s) => s.ruleId)).toEqual(stories);
    expect(v.stories.flatMap((s) => s.also.map((f) => f.ruleId))).toEqual(folded);
  });

  test('the folded findings are summed up in words', () => {
    const v = view([reading('Na', 40), reading('K', 30)], [coolant('act'), finding('k', 'fixed-limit', 'watch', 'K')]);
    const title = findRuleDefinition('fixed-limit')!.title.toLowerCase();
    expect([v.stories[0]!.alsoLead, v.stories[0]!.alsoDetail]).toEqual([
      'One more finding on these readings:',
      `${title} of potassium`,
    ]);
  });
});

describe('buildFindingsView: readings', () => {
  test('flagged readings first, worst level first; groups with a flagged reading open', () => {
    const v = view([reading('Fe', 12), reading('Si', 30), reading('Na', 40)], [finding('s', 'dirt', 'act', 'Si')]);
    const groups = Object.fromEntries(
      v.groups.map((g) => [
        g.group,
        { open: g.open, flagged: g.flagged, worst: g.worst, rows: g.rows.map((r) => r.measurand) },
      ]),
    );
    expect(groups['contaminant']).toEqual({ open: true, flagged: 1, worst: 'act', rows: ['Si', 'Na'] });
    expect(groups['wear']).toEqual({ open: false, flagged: 0, worst: 'steady', rows: ['Fe'] });
  });

  test('nothing flagged: the wear metals open, the rest folded', () => {
    const v = view([reading('Fe', 12), reading('Na', 4)], []);
    expect(v.groups.map((g) => [g.group, g.open])).toEqual([
      ['wear', true],
      ['contaminant', false],
    ]);
    expect([v.hasReadings, v.hasFindings, v.needsCautions]).toEqual([true, false, false]);
  });

  test.each<[string, StoredFinding, boolean]>([
    ['an act finding', finding('a', 'baseline-jump', 'act', 'Fe'), true],
    ['coolant at watch', coolant('watch'), true],
    ['fuel at watch', finding('u', 'fuel-dilution', 'watch', 'FUEL'), true],
    ['dirt at watch', finding('d', 'dirt', 'watch', 'Si'), true],
    ['a wear metal at watch', finding('w', 'baseline-jump', 'watch', 'Fe'), false],
  ])('cautions for %s: %s', (_name, f, cautions) => {
    expect(view([reading('Fe', 12)], [f]).needsCautions).toBe(cautions);
  });

  test('a crew band is named, with how many machines it pooled', () => {
    const v = view(
      [reading('Fe', 12)],
      [],
      [band('Fe', { source: 'crew', sourceLabel: 'from the crew’s other 300 cc singles', sourceMachines: 3 })],
    );
    expect(v.crewReference).toEqual({ label: 'from the crew’s other 300 cc singles', machines: 3 });
    expect(view([reading('Fe', 12)], [], [band('Fe')]).crewReference).toBeNull();
  });
});

describe('showReading and describeReadingBand', () => {
  test.each<[string, number, string | null, string]>([
    ['GLYCOL', 1, null, 'present'],
    ['GLYCOL', 0, null, 'not found'],
  ])('%s %d → %s', (code, value, qualifier, shown) => {
    expect(showReading(code, value, qualifier)).toBe(shown);
  });

  test('below detection keeps its sign in front of the figure', () => {
    expect(showReading('Fe', 1, '<').startsWith('<')).toBe(true);
  });

  test.each<[string, string]>([
    ['Fe', 'band still building'],
    ['Na', 'judged against this oil’s own level'],
    ['KV100', ''],
  ])('no band for %s → %j', (code, words) => {
    expect(describeReadingBand(code, undefined)).toBe(words);
  });

  test('a band is shown in ppm as reported at the sample (times toReported), with the crew words on a crew band', () => {
    const own = describeReadingBand('Fe', band('Fe', { toReported: 2 }));
    expect(own).toMatch(/^usual 20 ppm, band up to 28, act from 36 · from 5 samples \(judged per distance\)$/);
    expect(describeReadingBand('Fe', band('Fe', { source: 'crew', sourceLabel: 'of the crew' }))).toMatch(
      / · crew reference, of the crew$/,
    );
  });
});
