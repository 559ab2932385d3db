import { describe, expect, test } from 'vitest';
import {
  attachNewOil,
  buildNewOilLookup,
  chooseNewOilForAnalysis,
  newOilInputSchema,
  normaliseProductName,
  readingsFromDataSheet,
  type NewOilReference,
} from '~/lib/new-oil/new-oil';
import {
  buildReferenceList,
  describeReadings,
  describeReferenceState,
  formatReferenceReading,
  FIRST_SAMPLES_SERVE,
  newReferenceHref,
  referenceFormValues,
} from '~/lib/new-oil/new-oil-view';
import type { SamplePoint } from '~/lib/analysis/types';

// Invented product names throughout (no real brands).

describe('normaliseProductName', () => {
  test.each([
    ['Tarnwell 10W-40', 'tarnwell 10w-40'],
    ['  Tarnwell   10W-40 ', 'tarnwell 10w-40'],
    ['TARNWELL\t10w-40', 'tarnwell 10w-40'],
    ['Tarnwell\u00a010W-40', 'tarnwell 10w-40'], // a non-breaking space pasted from a data sheet
    ['Ｔarnwell 10W-40', 'tarnwell 10w-40'], // a full-width letter folds by NFKC
    ['Tarnwell 10W-50', 'tarnwell 10w-50'],
  ])('%j → %j', (input, key) => {
    expect(normaliseProductName(input)).toBe(key);
  });
});

const sheet = (o: Record<string, unknown>) =>
  newOilInputSchema.safeParse({ source: 'data-sheet', productName: 'Tarnwell 10W-40', ...o });
const fieldsOf = (r: ReturnType<typeof sheet>) =>
  r.success ? {} : Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]));

describe('data-sheet input', () => {
  test('form strings become numbers; a decimal comma and a thousands comma are both read', () => {
    const r = sheet({ KV100: '14,2', KV40: '98.5', Zn: '1,100', Ca: '2400', TBN: '' });
    expect(r.success).toBe(true);
    if (!r.success || r.data.source !== 'data-sheet') return;
    expect(r.data.KV100).toBe(14.2);
    expect(r.data.Zn).toBe(1100);
    expect(r.data.TBN).toBeUndefined();
  });

  test.each([
    { name: 'no figure at all', input: {}, field: 'KV100', message: /at least one figure/ },
    {
      name: 'swapped viscosities',
      input: { KV100: '98', KV40: '14' },
      field: 'KV40',
      message: /must be higher than the one at 100 °C.*swapped/,
    },
    { name: 'equal viscosities', input: { KV100: '14', KV40: '14' }, field: 'KV40', message: /must be higher/ },
    { name: 'KV100 below D2270’s 2.0 mm²/s', input: { KV100: '1.5' }, field: 'KV100', message: /cannot be below 2/ },
    { name: 'KV100 in SUS by mistake', input: { KV100: '450' }, field: 'KV100', message: /not an engine oil's figure/ },
    {
      name: 'zinc in percent typed as ppm the wrong way',
      input: { Zn: '120000' },
      field: 'Zn',
      message: /check the unit/,
    },
    { name: 'a negative additive', input: { Mo: '-5' }, field: 'Mo', message: /cannot be below 0/ },
    { name: 'text in a number field', input: { KV100: 'fourteen' }, field: 'KV100', message: /must be a number/ },
    {
      name: 'no product',
      input: { productName: '   ', KV100: '14' },
      field: 'productName',
      message: /Name the oil product/,
    },
    {
      name: 'a 100 KB product name',
      input: { productName: 'x'.repeat(100_000), KV100: '14' },
      field: 'productName',
      message: /under 120 characters/,
    },
  ])('$name is refused on $field', ({ input, field, message }) => {
    const f = fieldsOf(sheet(input));
    expect(f[field]).toMatch(message);
  });

  test('the viscosity index is worked out from both viscosities (ASTM D2270 procedure B example: 22.83/5.05 → 156)', () => {
    const r = sheet({ KV100: '5.05', KV40: '22.83', B: '120' });
    if (!r.success || r.data.source !== 'data-sheet') throw new Error('parse');
    expect(readingsFromDataSheet(r.data)).toEqual({
      KV100: { value: 5.05 },
      KV40: { value: 22.83 },
      B: { value: 120 },
      VI: { value: 156 },
    });
  });

  test('an unknown source is refused with a sentence', () => {
    const r = newOilInputSchema.safeParse({ source: 'guess', productName: 'Tarnwell' });
    expect(r.success).toBe(false);
    if (!r.success) expect(r.error.issues[0]!.message).toMatch(/data sheet or a lab sample/);
  });
});

describe('lab input', () => {
  test.each([
    { bottleCode: 'NO-77', ok: true },
    { bottleCode: '', ok: false },
    { bottleCode: '---', ok: false },
    { bottleCode: 'X'.repeat(65), ok: false },
  ])('bottle code $bottleCode → ok $ok', ({ bottleCode, ok }) => {
    expect(newOilInputSchema.safeParse({ source: 'lab', productName: 'Tarnwell 10W-40', bottleCode }).success).toBe(ok);
  });
});

const ref = (o: Partial<NewOilReference>): NewOilReference => ({
  id: 'r1',
  productName: 'Tarnwell 10W-40',
  productKey: 'tarnwell 10w-40',
  source: 'data-sheet',
  saeGrade: '10W-40',
  readings: {},
  bottleCode: null,
  resultsOn: null,
  note: '',
  updatedAt: new Date('2026-11-30T10:00:00Z'),
  ...o,
});

describe('chooseNewOilForAnalysis', () => {
  const sheetRef = ref({ readings: { KV100: { value: 14.2 }, Zn: { value: 1100 } } });
  const labRef = ref({
    id: 'r2',
    source: 'lab',
    bottleCode: 'NO-1',
    readings: { KV100: { value: 13.9 }, B: { value: 150 } },
  });
  const labWaiting = ref({ id: 'r3', source: 'lab', bottleCode: 'NO-2', readings: {} });

  test.each([
    { name: 'nothing', refs: [], expected: null },
    { name: 'a lab bottle still at the lab', refs: [labWaiting], expected: null },
    {
      name: 'a data sheet',
      refs: [sheetRef],
      expected: { newOil: { source: 'data-sheet', readings: sheetRef.readings }, newOilKv100: 14.2 },
    },
    {
      name: 'a lab result wins over the data sheet',
      refs: [sheetRef, labRef],
      expected: { newOil: { source: 'lab', readings: labRef.readings }, newOilKv100: 13.9 },
    },
    {
      name: 'a waiting bottle leaves the data sheet in force',
      refs: [labWaiting, sheetRef],
      expected: { newOil: { source: 'data-sheet', readings: sheetRef.readings }, newOilKv100: 14.2 },
    },
  ])('$name', ({ refs, expected }) => {
    expect(chooseNewOilForAnalysis(refs)).toEqual(expected);
  });

  test('a lab result without KV100 takes the data sheet’s KV100; one below detection is not a KV100', () => {
    const labNoKv = ref({ id: 'r4', source: 'lab', bottleCode: 'NO-3', readings: { Zn: { value: 1050 } } });
    expect(chooseNewOilForAnalysis([labNoKv, sheetRef])?.newOilKv100).toBe(14.2);
    const labBelow = ref({
      id: 'r5',
      source: 'lab',
      bottleCode: 'NO-4',
      readings: { KV100: { value: 2, qualifier: '<' } },
    });
    expect(chooseNewOilForAnalysis([labBelow])?.newOilKv100).toBeUndefined();
  });
});

describe('attachNewOil', () => {
  const lookup = buildNewOilLookup([
    ref({ readings: { KV100: { value: 14.2 } } }),
    ref({ id: 'x', productKey: 'other oil', productName: 'Other oil', readings: { Zn: { value: 900 } } }),
  ]);
  const point: SamplePoint = {
    id: 's',
    takenAt: '2026-11-01',
    odometer: 1000,
    distanceOnOil: 500,
    oilProduct: '  TARNWELL  10w-40',
    readings: { KV100: { value: 9.1 } },
  };

  test('fills newOil and newOilKv100 for a sample of the product, matched by its normalised name', () => {
    const p = attachNewOil(point, lookup);
    expect(p.newOilKv100).toBe(14.2);
    expect(p.newOil).toEqual({ source: 'data-sheet', readings: { KV100: { value: 14.2 } } });
    expect(p.readings).toBe(point.readings);
  });

  test.each([
    { name: 'another product', oilProduct: 'Tarnwell 10W-50' },
    { name: 'no product on the oil change', oilProduct: undefined },
  ])('leaves a sample of $name as it was', ({ oilProduct }) => {
    const p = { ...point, oilProduct };
    expect(attachNewOil(p, lookup)).toBe(p);
  });
});

describe('new-oil screens', () => {
  test.each([
    ['KV100', { value: 14.2 }, 'KV100 14.2 mm²/s'],
    ['Zn', { value: 1100 }, 'Zn 1,100 ppm'],
    ['B', { value: 1, qualifier: '<' as const }, 'B <1 ppm'],
    ['TBN', { value: 8.456 }, 'TBN 8.46 mg KOH/g'],
    ['VI', { value: 156 }, 'VI 156'],
  ] as const)('formatReferenceReading %s', (code, reading, text) => {
    expect(formatReferenceReading(code, reading)).toBe(text);
  });

  test('figures come in catalogue order', () => {
    expect(describeReadings({ KV100: { value: 14.2 }, Zn: { value: 1100 }, Ca: { value: 2400 } })).toBe(
      'Zn 1,100 ppm · Ca 2,400 ppm · KV100 14.2 mm²/s',
    );
  });

  test('the list puts products without figures first and merges poured products with their references', () => {
    const items = buildReferenceList(
      [ref({ readings: { KV100: { value: 14.2 } } })],
      [
        {
          productKey: 'tarnwell 10w-40',
          productName: 'Tarnwell 10W-40',
          saeGrade: '10W-40',
          machines: 2,
          lastChangedOn: '2026-10-01',
          references: [],
        },
        {
          productKey: 'quarrow 15w-50',
          productName: 'Quarrow 15W-50',
          saeGrade: '15W-50',
          machines: 1,
          lastChangedOn: '2026-09-01',
          references: [],
        },
      ],
    );
    expect(items.map((i) => [i.productName, i.machines, i.inUse, i.references.length])).toEqual([
      ['Quarrow 15W-50', 1, false, 0],
      ['Tarnwell 10W-40', 2, true, 1],
    ]);
    expect(FIRST_SAMPLES_SERVE).toMatch(/first samples of this oil serve/);
  });

  test('form links and edit values', () => {
    expect(newReferenceHref('Quarrow 15W-50', '15W-50', 'lab')).toBe(
      '/oil-references/new?source=lab&product=Quarrow+15W-50&grade=15W-50',
    );
    expect(referenceFormValues(ref({ readings: { KV100: { value: 14.2 }, VI: { value: 150 } } }))).toEqual({
      productName: 'Tarnwell 10W-40',
      saeGrade: '10W-40',
      note: '',
      bottleCode: '',
      KV100: '14.2',
    });
  });
});

describe('describeReferenceState', () => {
  // Saved at 10:00 UTC on 30 Nov: Pacific/Kiritimati is UTC+14 all year (IANA tz database), so there it is
  // already 1 Dec; America/Los_Angeles (UTC−8 in November) is still on 30 Nov.
  test.each([
    [ref({}), 'UTC', 'Saved 30 Nov 2026'],
    [ref({}), 'Pacific/Kiritimati', 'Saved 1 Dec 2026'],
    [ref({}), 'America/Los_Angeles', 'Saved 30 Nov 2026'],
    [ref({}), null, 'Saved 30 Nov 2026'],
    [
      ref({ source: 'lab', bottleCode: 'NO-1' }),
      'UTC',
      'Bottle NO-1 is at the lab: its results are written here when the lab’s file is imported.',
    ],
    [
      ref({ source: 'lab', bottleCode: 'NO-1', resultsOn: '2026-11-20', readings: { KV100: { value: 14 } } }),
      'Pacific/Kiritimati',
      'Bottle NO-1, results of 20 Nov 2026',
    ],
  ])('%# in %s', (r, zone, text) => {
    expect(describeReferenceState(r, zone)).toBe(text);
  });
});
