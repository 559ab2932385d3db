import { describe, expect, test } from 'vitest';
import {
  buildMachinePageView,
  describeGradeTemperatures,
  describeMachineSpec,
  RECENT_CHANGES,
} from '~/lib/machines/machine-page-view';
import type { Machine } from '~/lib/machines/machines';
import type { OilChange } from '~/lib/oil-changes/oil-changes';
import { describeForecast } from '~/lib/wear-parts/forecast-words';
import type { WearPart } from '~/lib/wear-parts/wear-parts';

const machine: Machine = {
  id: 'm1',
  crewId: 'c1',
  ownerUserId: 'u1',
  name: 'Trail 450',
  modelYear: 2019,
  engineLayout: 'single',
  displacementCc: 449,
  cooling: 'liquid',
  sharedOil: true,
  oilCapacityL: 1.2,
  meter: 'km',
  recommendedGrades: [{ grade: '10W-40', minC: -10, maxC: 40 }],
  maxIntervalStored: 3000,
  maxIntervalDays: 365,
  notes: '',
  archivedAt: null,
};

type Change = OilChange & { photos: { id: string; caption: string }[] };

function change(i: number, over: Partial<Change> = {}): Change {
  return {
    id: `oc${i}`,
    machineId: 'm1',
    changedOn: `2026-0${9 - i}-01`,
    odometer: 10_000 - i * 1000,
    meterReplaced: false,
    oilProduct: 'Shop oil',
    saeGrade: '10W-40',
    volumeL: 1.2,
    filterChanged: true,
    topUpL: 0,
    otherWork: [],
    notes: '',
    distanceSincePrevious: 1000,
    photos: [],
    ...over,
  };
}

describe('machine page words', () => {
  // The machine form's open ends (−40 °C: any cold, 55 °C: any heat); °F = °C × 9/5 + 32 (NIST SP 811 B.9).
  test.each([
    [-40, 30, 'C', 'up to 30 °C'],
    [10, 55, 'C', 'from 10 °C'],
    [-10, 40, 'C', '-10 °C to 40 °C'],
    [-10, 40, 'F', '14 °F to 104 °F'],
  ] as const)('%d…%d in %s: %s', (minC, maxC, unit, text) =>
    expect(describeGradeTemperatures(minC, maxC, unit)).toBe(text),
  );

  test.each([
    [machine, '2019 · 449 cc · Single · Liquid-cooled · shared engine/gearbox/clutch oil · 1.2 L'],
    [
      {
        ...machine,
        modelYear: null,
        displacementCc: null,
        oilCapacityL: null,
        sharedOil: false,
        cooling: 'air' as const,
      },
      'Single · Air-cooled · separate gearbox oil',
    ],
  ])('spec of %#: %s', (m, text) => expect(describeMachineSpec(m)).toBe(text));
});

describe('the machine page model', () => {
  const base = {
    machine,
    samples: [],
    oilChanges: [],
    wearParts: [],
    temperatureUnit: 'C' as const,
    lengthUnit: 'mm' as const,
    added: false,
    logged: false,
  };

  test.each([
    [{ added: true, logged: false }, 'Machine added. Log its last oil change next.'],
    [{ added: false, logged: true }, 'Oil change logged.'],
    [{ added: false, logged: false }, ''],
  ])('flash %o: "%s"', (flags, flash) => expect(buildMachinePageView({ ...base, ...flags }).flash).toBe(flash));

  test('a machine with nothing logged', () => {
    expect(buildMachinePageView(base)).toMatchObject({
      samples: [],
      oilNow: null,
      recentChanges: [],
      olderChanges: [],
      wearParts: [],
      longestInterval: '3,000 km or 365 days',
      grades: [{ grade: '10W-40', temperatures: '-10 °C to 40 °C' }],
    });
  });

  test('recent changes are cards with their words, older ones a table', () => {
    const changes = [
      change(0, { topUpL: 0.2, otherWork: ['chain'], photos: [{ id: 'p1', caption: '' }] }),
      ...[1, 2, 3].map((i) => change(i)),
      change(4, {
        distanceSincePrevious: null,
        meterReplaced: true,
        photos: [{ id: 'p2', caption: 'drain plug' }],
        otherWork: ['plug', 'washer'],
      }),
    ];
    const v = buildMachinePageView({ ...base, oilChanges: changes });
    expect(v.recentChanges).toHaveLength(RECENT_CHANGES);
    expect(v.recentChanges[0]).toEqual({
      changedOn: '2026-09-01',
      odometer: '10,000 km',
      sincePrevious: '1,000 km',
      sinceWords: 'first logged change',
      oil: '10W-40 · Shop oil · 1.2 L · filter changed · 0.2 L topped up before',
      otherWork: ['chain'],
      photos: [{ href: '/api/photos/p1', alt: 'Photo from the oil change on 1 Sep 2026' }],
    });
    expect(v.oilNow).toEqual({ grade: '10W-40', product: '· Shop oil', since: '2026-09-01', odometer: '10,000 km' });
    expect(v.olderChanges).toEqual([
      {
        changedOn: '2026-05-01',
        odometer: '6,000 km',
        sincePrevious: '—',
        oil: '10W-40 · Shop oil · plug; washer · 1 photo(s)',
      },
    ]);
  });

  test('samples and wear parts in the machine unit and the rider length unit', () => {
    const sample = {
      id: 's1',
      bottleCode: 'K7MQ4XH',
      drawnOn: '2026-09-01',
      odometer: 10_000,
      distanceOnOil: null,
      state: 'results_in' as const,
    };
    const part: WearPart = {
      id: 'w1',
      machineId: 'm1',
      name: 'Clutch plates',
      pieceCount: 8,
      newMinMm: 2.9,
      newMaxMm: 3.1,
      serviceLimitMm: 2.6,
      limitDirection: 'min',
      fittedOdometer: 0,
      manualUnit: 'mm',
      notes: '',
    };
    const forecast = { status: 'no-readings' as const };
    const v = buildMachinePageView({
      ...base,
      lengthUnit: 'in',
      samples: [sample as never],
      wearParts: [
        {
          part,
          forecast,
          measurements: [
            { id: 'x', measuredOn: '2026-09-01', odometer: 9_500.4, piecesMm: [], summaryMm: 2.8, note: '' },
          ],
        },
      ],
    });
    expect(v.samples).toEqual([
      {
        href: '/samples/s1',
        bottleCode: 'K7MQ4XH',
        drawnOn: '2026-09-01',
        odometer: '10,000 km',
        onOil: '—',
        state: 'Results in',
        level: null,
        call: null,
      },
    ]);
    // 2.6 mm = 0.102 in, 2.8 mm = 0.110 in (1 in = 25.4 mm exactly, NIST SP 811 B.8).
    expect(v.wearParts).toEqual([
      {
        href: '/machines/m1/wear-parts/w1',
        name: 'Clutch plates',
        limit: 'Limit 0.102 in · last 0.110 in at 9,500 km',
        headline: describeForecast(forecast, 'km', part).headline,
      },
    ]);
  });
});
