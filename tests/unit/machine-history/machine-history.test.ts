import { describe, expect, test } from 'vitest';
import {
  buildMachineHistory,
  type HistoryCall,
  type HistoryFinding,
  type HistorySample,
  type MachineHistoryInput,
} from '~/lib/machine-history/machine-history';
import type { Machine } from '~/lib/machines/machines';

// Invented machine and figures; no published source is involved.
const machine: Machine = {
  id: 'm1',
  crewId: 'c1',
  ownerUserId: 'u1',
  name: 'Trail 300',
  modelYear: 2021,
  engineLayout: 'single',
  displacementCc: 300,
  cooling: 'liquid',
  sharedOil: true,
  oilCapacityL: 1.2,
  meter: 'km',
  recommendedGrades: [],
  maxIntervalStored: null,
  maxIntervalDays: null,
  notes: '',
  archivedAt: null,
};
const sample = (id: string, state: HistorySample['state'], drawnOn = '2026-03-01'): HistorySample => ({
  id,
  bottleCode: `B-${id}`,
  drawnOn,
  odometer: 12000,
  distanceOnOil: null,
  saeGrade: null,
  state,
});
const finding = (
  sampleId: string,
  level: HistoryFinding['level'],
  ruleId = 'fixed-limit',
  measurand: string | null = 'Fe',
): HistoryFinding => ({
  sampleId,
  level,
  ruleId,
  measurand,
  sentence: `${level} ${ruleId}`,
});
const call = (sampleId: string, source: HistoryCall['source'], at: string, note = ''): HistoryCall => ({
  sampleId,
  call: source === 'override' ? 'shorten' : 'hold',
  source,
  note,
  createdAt: new Date(at),
  authorRole: source === 'engine' ? null : 'mechanic',
  authorName: source === 'engine' ? null : 'Ana',
});
const input = (over: Partial<MachineHistoryInput>): MachineHistoryInput => ({
  machine,
  lengthUnit: 'mm',
  oilChanges: [],
  samples: [],
  readings: [],
  findings: [],
  calls: [],
  parts: [],
  printedOn: '2026-12-02',
  ...over,
});

describe('buildMachineHistory', () => {
  test.each<[string, HistorySample['state'], HistoryFinding[], string | null, string]>([
    ['waiting for the lab shows where it is', 'shipped', [], null, 'shipped'],
    ['results with no finding is steady', 'results_in', [], 'steady', 'results in'],
    [
      'the worst finding wins',
      'reviewed',
      [finding('s1', 'watch'), finding('s1', 'act', 'dirt', 'Si'), finding('s1', 'watch')],
      'act',
      'reviewed',
    ],
  ])('sample level: %s', (_name, state, findings, level, words) => {
    const v = buildMachineHistory(input({ samples: [sample('s1', state)], findings }));
    expect(v.samples[0]).toMatchObject({ level, stateWords: words });
  });

  test.each<[string, HistoryCall[], { word: string; author: string } | null, string | null]>([
    ['no call', [], null, null],
    ['the rules’ call', [call('s1', 'engine', '2026-03-02')], { word: 'Hold', author: 'made by the rules' }, null],
    [
      'the newest call counts; an override brings its note',
      [call('s1', 'override', '2026-03-05', 'Coolant seen at the drain.'), call('s1', 'engine', '2026-03-02')],
      { word: 'Shorten', author: 'changed by Ana (mechanic)' },
      'Note with the call (changed by Ana (mechanic)): Coolant seen at the drain.',
    ],
  ])('calls: %s', (_name, calls, expected, note) => {
    const v = buildMachineHistory(
      input({ samples: [sample('s1', 'results_in')], findings: [finding('s1', 'watch')], calls }),
    );
    expect(v.samples[0]!.call).toEqual(expected);
    expect(v.findings[0]!.overrideNote).toBe(note);
  });

  test.each<[string, number, string | null, string]>([
    ['a plain value, two decimals at most', 12.345, null, '12.35'],
    ['below detection keeps its sign', 1, '<', '<1'],
    ['a whole number stays whole', 40, null, '40'],
  ])('readings: %s', (_name, value, qualifier, shown) => {
    const v = buildMachineHistory(
      input({
        samples: [sample('s1', 'results_in')],
        readings: [{ sampleId: 's1', measurand: 'Fe', value, qualifier }],
      }),
    );
    expect(v.samples[0]!.readings[0]).toBe(shown);
    expect(v.samples[0]!.readings.slice(1).every((r) => r === '')).toBe(true);
  });

  test('findings of samples with results only, worst first, with the day and the reason', () => {
    const v = buildMachineHistory(
      input({
        samples: [sample('s1', 'results_in', '2026-01-10'), sample('s2', 'reviewed', '2026-02-10')],
        findings: [
          finding('s2', 'watch'),
          finding('s1', 'watch', 'dirt', 'Si'),
          finding('s2', 'act', 'fixed-limit', 'Al'),
        ],
      }),
    );
    expect(v.findings.map((f) => [f.title.split(' · ')[0], f.level])).toEqual([
      ['10 Jan 2026', 'watch'],
      ['10 Feb 2026', 'act'],
      ['10 Feb 2026', 'watch'],
    ]);
    expect(v.hasFindings).toBe(true);
    expect(buildMachineHistory(input({})).hasFindings).toBe(false);
  });

  test.each<[string, number, number, string]>([
    ['one of each', 1, 1, '1 sample with lab results, 1 oil change.'],
    ['none', 0, 0, '0 samples with lab results, 0 oil changes.'],
    ['several', 3, 2, '3 samples with lab results, 2 oil changes.'],
  ])('summary: %s', (_name, nSamples, nChanges, summary) => {
    const samples = Array.from({ length: nSamples }, (_, i) => sample(`s${i}`, 'results_in'));
    const oilChanges = Array.from({ length: nChanges }, (_, i) => ({
      id: `o${i}`,
      machineId: 'm1',
      changedOn: `2026-0${i + 1}-01`,
      odometer: 5000 - i * 1000,
      meterReplaced: false,
      oilProduct: 'Any 10W-40',
      saeGrade: '10W-40',
      volumeL: 1,
      filterChanged: i === 0,
      topUpL: 0,
      otherWork: [],
      notes: '',
      distanceSincePrevious: null,
    }));
    const v = buildMachineHistory(input({ samples, oilChanges }));
    expect(v.summary).toBe(summary);
    // Oil changes are listed by odometer, lowest first.
    expect(v.oilChanges.map((c) => c.odometer)).toEqual(
      [...oilChanges].sort((a, b) => a.odometer - b.odometer).map((c) => `${c.odometer.toLocaleString('en-US')} km`),
    );
  });

  test('the machine line leaves out what is unknown', () => {
    expect(buildMachineHistory(input({})).facts).toBe(
      '2021 · 300 cc · single · liquid-cooled · engine, gearbox and clutch share the oil',
    );
    expect(
      buildMachineHistory(input({ machine: { ...machine, modelYear: null, displacementCc: null, sharedOil: false } }))
        .facts,
    ).toBe('single · liquid-cooled');
  });
});
