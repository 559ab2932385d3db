/**
 * Scenario tests on invented histories from the demo valley (invented machines, oils and figures):
 * each story gives the expected findings and interval call.
 */
import { describe, expect, test } from 'vitest';
import { replayHistory } from '~/lib/analysis/interval-call';
import type { MeasurandCode } from '~/lib/analysis/measurands';
import type { MachineProfile, SamplePoint } from '~/lib/analysis/types';
import { makeSample } from './sample-builder';

type Readings = Partial<Record<MeasurandCode, number>>;

function run(machine: MachineProfile, sets: Readings[], extras: Partial<SamplePoint>[] = [], interval = 3000) {
  const samples = sets.map((r, i) => makeSample(i, r, extras[i] ?? {}, interval));
  // The replay production runs: earlier act readings stay out of the baseline, earlier calls are known.
  const { analysis, call } = replayHistory({ machine, samples }).at(-1)!;
  const findings = analysis.findings.map((f) => `${f.ruleId}:${f.measurands.join('+')}:${f.level}`).sort();
  return { analysis, call, findings };
}

const common = {
  Fe: 18,
  Cu: 4,
  Cr: 1,
  Pb: 2,
  Sn: 1,
  Ni: 1,
  Zn: 1100,
  P: 950,
  Ca: 2100,
  Mg: 20,
  Mo: 60,
  Na: 4,
  K: 1,
  B: 3,
  KV100: 14.1,
  FUEL: 0.5,
  WATER: 0.02,
};

describe('scenario: aluminium climbing on the 450 single', () => {
  const machine: MachineProfile = { cooling: 'liquid', distanceUnit: 'km', maxIntervalDistance: 5000 };
  const al = [4, 5, 4, 5, 4, 6, 8, 10];

  test('the climb is caught as a trend first: watch, hold, next sample at the same interval', () => {
    const sets = al.slice(0, 7).map((a) => ({ ...common, Si: 7, Al: a }));
    const { findings, call } = run(machine, [...sets, { ...common, Si: 7, Al: 9 }]);
    // Al 5, 4, 6, 8, 9 over the last six samples: a slope well beyond lab scatter, rising more than half the
    // earlier level but not doubling it. A climbing-trend watch holds and asks for the next sample on time.
    expect(findings).toEqual(['climbing-trend:Al:watch']);
    expect(call.call).toBe('hold');
    expect(call.nextIntervalDistance).toBe(3000);
    expect(call.nextSampleDue.distance).toBe(8 * 3000 + 3000);
  });

  test('when it keeps climbing it jumps out of the band: act, shorten to half, sample soon', () => {
    const sets = al.map((a) => ({ ...common, Si: 7, Al: a }));
    const { findings, call } = run(machine, [...sets, { ...common, Si: 7, Al: 13 }]);
    // The climb was there before this reading, so the trend stands beside the jump; doubled: act.
    expect(findings).toEqual(['baseline-jump:Al:watch', 'climbing-trend:Al:act']);
    expect(call.call).toBe('shorten');
    expect(call.nextIntervalDistance).toBe(1500);
    expect(call.nextSampleDue.distance).toBe(9 * 3000 + 700);
  });
});

describe('scenario: a silicon spike after a dusty week and its recovery after a new air filter (690 single)', () => {
  const machine: MachineProfile = { cooling: 'liquid', distanceUnit: 'km', maxIntervalDistance: 10000 };
  const before = [8, 9, 8, 10, 9].map((si) => ({ ...common, Si: si, Al: 4 }));
  const dusty = { ...common, Si: 34, Al: 15 };

  test('the dusty week: dirt, silicon over its limit and aluminium out of its band, act — fix the cause first', () => {
    const { findings, call, analysis } = run(machine, [...before, dusty]);
    expect(findings).toEqual(['baseline-jump:Al:act', 'baseline-jump:Si:act', 'dirt:Si+Al:act', 'fixed-limit:Si:act']);
    expect(analysis.findings.find((f) => f.ruleId === 'dirt')?.sentence).toMatch(/air filter/);
    expect(call.call).toBe('fix-first');
    expect(call.nextIntervalDistance).toBe(3000);
    expect(call.nextSampleDue.distance).toBe(6 * 3000 + 700);
  });

  test('after the new air filter everything is steady again; the call holds (no stretch straight after a spike)', () => {
    const { findings, call, analysis } = run(machine, [...before, dusty, { ...common, Si: 10, Al: 5 }]);
    expect(findings).toEqual([]);
    expect(analysis.worst).toBe('steady');
    expect(call.call).toBe('hold');
  });
});

describe('scenario: coolant markers on the 1,200 cc liquid-cooled twin', () => {
  const machine: MachineProfile = {
    cooling: 'liquid',
    distanceUnit: 'mi',
    maxIntervalDistance: 6000,
    maxIntervalDays: 365,
  };
  const steady = [0, 1, 2, 3].map(() => ({ ...common, Si: 6, Al: 3 }));
  const leaking = { ...common, Si: 6, Al: 3, Na: 38, K: 14, B: 9 };

  test("Na and K up well past the oil's own level: coolant markers act, fix first", () => {
    const { findings, call } = run(machine, [...steady, leaking]);
    expect(findings).toEqual([
      'baseline-jump:B:watch',
      'baseline-jump:K:act',
      'baseline-jump:Na:act',
      'coolant-markers:Na+K:act',
    ]);
    expect(call.call).toBe('fix-first');
    expect(call.nextIntervalDistance).toBe(3000);
    expect(call.reasons.join(' ')).toMatch(/coolant/i);
  });

  test('the same readings on an air-cooled engine raise no coolant finding', () => {
    const { findings } = run({ ...machine, cooling: 'air' }, [...steady, leaking]);
    expect(findings.some((f) => f.startsWith('coolant-markers'))).toBe(false);
  });
});

describe('scenario: fuel dilution from short winter trips on the air-cooled 650 single', () => {
  const machine: MachineProfile = { cooling: 'air', distanceUnit: 'km', maxIntervalDistance: 6000 };
  const summer = [0, 1, 2, 3].map(() => ({ ...common, Si: 6, Al: 3 }));

  test('first winter sample: fuel 3.5 % and the oil thinned out of its 40 grade (13.5 % under new, inside ±15 %), watch and hold', () => {
    const { findings, call } = run(
      machine,
      [...summer, { ...common, Si: 6, Al: 3, FUEL: 3.5, KV100: 12.2 }],
      [{}, {}, {}, {}, { newOilKv100: 14.1 }],
    );
    expect(findings).toEqual(['fuel-dilution:FUEL:watch', 'viscosity-grade:KV100:watch']);
    expect(call.call).toBe('hold');
  });

  test('deeper into winter: fuel 5.5 %, act and shorten', () => {
    const { findings, call } = run(
      machine,
      [...summer, { ...common, Si: 6, Al: 3, FUEL: 3.5 }, { ...common, Si: 6, Al: 3, FUEL: 5.5, KV100: 11.2 }],
      [{}, {}, {}, {}, {}, { newOilKv100: 14.1 }],
    );
    // KV100 11.2 is 20.6 % under new: watch on the ±15 % rule (act only from 25 % or below the SAE 30 window).
    expect(findings).toEqual(['fuel-dilution:FUEL:act', 'viscosity-change:KV100:watch', 'viscosity-grade:KV100:watch']);
    expect(call.call).toBe('shorten');
  });
});

describe('scenario: a stable engine earns "stretch"', () => {
  test('seven steady samples (a ready band of four, then three steady on it): stretch by 20 %, within the manufacturer maximum', () => {
    const machine: MachineProfile = { cooling: 'oil', distanceUnit: 'mi', maxIntervalDistance: 6000 };
    const fe = [17, 19, 18, 20, 18, 19, 18];
    const { findings, call, analysis } = run(
      machine,
      fe.map((f) => ({ ...common, Fe: f, Si: 6, Al: 3 })),
      [],
      4000,
    );
    expect(findings).toEqual([]);
    expect(analysis.baselineStatus).toBe('ready');
    expect(call.call).toBe('stretch');
    expect(call.nextIntervalDistance).toBe(4800);
    expect(call.nextSampleDue.distance).toBe(7 * 4000 + 4800);
  });
});
