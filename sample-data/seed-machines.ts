// Demo machines of the invented scenario: the trail school's four bikes and the solo rider's one, with about
// two years of oil changes, a drain-card sample at each drain after the first, and wear parts with
// measurements. Names, histories, parts, ranges, limits and figures are all invented for the demo; the wear
// parts only look like the trade's (common practice, no published source) and belong to no real model.
import type { Kysely, Transaction } from 'kysely';
import type { Database, RecommendedGrade } from '../src/lib/db/database';
import { computeCheckSymbol, CODE_ALPHABET, normaliseBottleCode } from '../src/lib/samples/bottle-code';
import { toMillimetres, toStoredMeter, type MeterUnit } from '../src/lib/units/units';

type Db = Kysely<Database> | Transaction<Database>;

interface DemoChange {
  on: string;
  /** In the machine's meter unit. */
  odometer: number;
  grade: string;
  product: string;
  topUpL?: number;
  work?: string[];
  filter?: boolean;
}

interface DemoWearPart {
  name: string;
  pieces: number;
  unit: 'in' | 'mm';
  newMin: number;
  newMax: number;
  limit: number;
  direction?: 'min' | 'max';
  fittedAt: number;
  readings: { on: string; odometer: number; pieces?: number[]; value?: number }[];
}

interface DemoMachine {
  key: string;
  name: string;
  year: number;
  layout: 'single' | 'twin';
  cc: number;
  cooling: 'air' | 'oil' | 'liquid';
  capacityL: number;
  meter: MeterUnit;
  grades: RecommendedGrade[];
  maxInterval: number;
  maxIntervalDays: number;
  notes: string;
  codes: 'issued' | 'kit';
  changes: DemoChange[];
  wearParts: DemoWearPart[];
}

const addDays = (iso: string, days: number) =>
  new Date(Date.parse(`${iso}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);

/** A run of oil changes: start date/odometer, then [days, distance] steps. */
function history(
  start: string,
  odometer: number,
  steps: [days: number, distance: number][],
  base: Omit<DemoChange, 'on' | 'odometer'>,
  extras: Record<number, Partial<DemoChange>> = {},
): DemoChange[] {
  const out: DemoChange[] = [{ on: start, odometer, ...base, ...extras[0] }];
  let on = start;
  let odo = odometer;
  steps.forEach(([days, distance], i) => {
    on = addDays(on, days);
    odo += distance;
    out.push({ on, odometer: odo, ...base, ...extras[i + 1] });
  });
  return out;
}

/** The demo's machines: school bikes first (owners assigned in turn), then the solo rider's. */
export const DEMO_MACHINES: readonly DemoMachine[] = [
  {
    key: 'marten',
    name: 'Marten',
    year: 2021,
    layout: 'single',
    cc: 450,
    cooling: 'liquid',
    capacityL: 1.1,
    meter: 'km',
    grades: [
      { grade: '10W-50', minC: -10, maxC: 55 },
      { grade: '5W-40', minC: -25, maxC: 20 },
    ],
    maxInterval: 3000,
    maxIntervalDays: 365,
    notes: 'Lesson bike for the advanced group. Oil and filter every 1,500 km of hard trail use.',
    codes: 'issued',
    changes: history(
      '2024-11-18',
      8_420,
      [
        [62, 1_480],
        [55, 1_530],
        [48, 1_510],
        [41, 1_460],
        [44, 1_550],
        [52, 1_500],
        [60, 1_470],
        [58, 1_520],
        [66, 1_490],
        [54, 1_505],
        [49, 1_515],
        [45, 1_480],
      ],
      { grade: '10W-50', product: 'Quillmoor Synth 4T', filter: true },
      {
        6: { work: ['Valve clearances checked, all in spec'] },
        10: { work: ['Piston and rings inspected: light scuffing on the exhaust side noted'] },
      },
    ),
    wearParts: [
      {
        name: 'Front brake pads',
        pieces: 2,
        unit: 'mm',
        newMin: 4.5,
        newMax: 5.0,
        limit: 1.0,
        fittedAt: 14_500,
        readings: [
          { on: '2025-09-20', odometer: 17_540, pieces: [3.9, 4.0] },
          { on: '2026-03-25', odometer: 22_100, pieces: [3.1, 3.2] },
          { on: '2026-10-05', odometer: 27_400, pieces: [2.5, 2.6] },
        ],
      },
    ],
  },
  {
    key: 'heron',
    name: 'Heron',
    year: 2020,
    layout: 'single',
    cc: 690,
    cooling: 'liquid',
    capacityL: 1.7,
    meter: 'km',
    grades: [
      { grade: '10W-50', minC: -10, maxC: 55 },
      { grade: '10W-40', minC: -10, maxC: 35 },
    ],
    maxInterval: 10_000,
    maxIntervalDays: 365,
    notes: 'Dual-sport for the valley tours. Air filter checked after every dusty week.',
    codes: 'kit',
    changes: history(
      '2024-12-02',
      21_300,
      [
        [75, 4_600],
        [70, 4_820],
        [64, 4_700],
        [88, 4_950],
        [95, 4_500],
        [71, 4_880],
        [66, 4_760],
        [80, 4_690],
      ],
      { grade: '10W-50', product: 'Quillmoor Synth 4T', filter: true },
      {
        3: { work: ['Air filter found dusty after the quarry week; cleaned and re-oiled'] },
        4: { work: ['Air filter replaced (new element)', 'Airbox seal checked'] },
        6: { topUpL: 0.2 },
      },
    ),
    wearParts: [
      {
        name: 'Drive chain, 20-pitch length',
        pieces: 1,
        unit: 'mm',
        newMin: 317.5,
        newMax: 318.0,
        limit: 323.0,
        direction: 'max',
        fittedAt: 30_200,
        readings: [
          { on: '2025-10-02', odometer: 41_000, value: 319.2 },
          { on: '2026-05-14', odometer: 54_300, value: 320.6 },
        ],
      },
    ],
  },
  {
    key: 'bruin',
    name: 'Old Bruin',
    year: 2017,
    layout: 'twin',
    cc: 1_200,
    cooling: 'liquid',
    capacityL: 4.0,
    meter: 'km',
    grades: [
      { grade: '10W-40', minC: -15, maxC: 40 },
      { grade: '15W-50', minC: 0, maxC: 55 },
    ],
    maxInterval: 10_000,
    maxIntervalDays: 730,
    notes: 'Luggage and sweep bike. Coolant topped up twice this year; water pump seal under watch.',
    codes: 'kit',
    changes: history(
      '2024-12-10',
      61_200,
      [
        [98, 6_100],
        [84, 6_350],
        [120, 5_900],
        [91, 6_200],
        [110, 6_050],
        [88, 6_400],
      ],
      { grade: '10W-40', product: 'Tarnwick Twin Road 4T', filter: true },
      {
        4: { work: ['Coolant level low: topped up 0.3 L'] },
        5: { work: ['Weep mark at the water pump tell-tale hole; seal kit ordered'], topUpL: 0.3 },
      },
    ),
    wearParts: [
      {
        name: 'Front brake disc thickness',
        pieces: 2,
        unit: 'mm',
        newMin: 4.9,
        newMax: 5.1,
        limit: 4.5,
        fittedAt: 52_000,
        readings: [
          { on: '2025-06-30', odometer: 73_800, pieces: [4.82, 4.84] },
          { on: '2026-07-12', odometer: 97_600, pieces: [4.71, 4.73] },
        ],
      },
    ],
  },
  {
    key: 'sorrel',
    name: 'Sorrel',
    year: 2014,
    layout: 'single',
    cc: 650,
    cooling: 'air',
    capacityL: 2.4,
    meter: 'km',
    grades: [
      { grade: '10W-40', minC: -15, maxC: 35 },
      { grade: '15W-50', minC: 0, maxC: 50 },
    ],
    maxInterval: 5_000,
    maxIntervalDays: 365,
    notes: 'Beginner bike; in winter it mostly does short runs to the practice field.',
    codes: 'issued',
    changes: history(
      '2024-11-25',
      33_800,
      [
        [70, 1_900],
        [80, 2_600],
        [60, 2_900],
        [72, 3_000],
        [88, 2_400],
        [70, 1_700],
        [66, 1_800],
        [78, 2_700],
        [60, 2_950],
      ],
      { grade: '10W-40', product: 'Saltrush Mineral 4T', filter: true },
      {
        2: { grade: '15W-50', product: 'Saltrush Mineral 4T Summer' },
        3: { grade: '15W-50', product: 'Saltrush Mineral 4T Summer' },
        6: { work: ['Choke cable adjusted (short winter runs)'] },
      },
    ),
    wearParts: [
      {
        name: 'Rear brake shoe lining',
        pieces: 2,
        unit: 'mm',
        newMin: 4.0,
        newMax: 4.4,
        limit: 1.5,
        fittedAt: 24_300,
        readings: [
          { on: '2025-04-18', odometer: 37_900, pieces: [3.6, 3.5] },
          { on: '2026-06-02', odometer: 51_900, pieces: [2.3, 2.4] },
        ],
      },
    ],
  },
  {
    key: 'wren',
    name: 'Wren',
    year: 2016,
    layout: 'twin',
    cc: 870,
    cooling: 'liquid',
    capacityL: 3.4,
    meter: 'mi',
    grades: [
      { grade: '5W-40', minC: -25, maxC: 35 },
      { grade: '15W-50', minC: -5, maxC: 50 },
    ],
    maxInterval: 6_000,
    maxIntervalDays: 365,
    notes: 'Weekend tourer. Oil changed every spring and autumn.',
    codes: 'issued',
    // Eight oil changes on one oil: enough in-control samples for a ready baseline and three steady ones after it.
    changes: history(
      '2023-04-10',
      6_900,
      [
        [202, 2_000],
        [202, 2_000],
        [202, 2_000],
        [140, 2_100],
        [150, 2_000],
        [165, 1_980],
        [140, 2_120],
        [130, 2_000],
      ],
      { grade: '5W-40', product: 'Larkspire Synthetic 4T', filter: true },
      { 7: { work: ['Clutch springs measured with calipers during a clutch cable change'] } },
    ),
    wearParts: [
      {
        // Invented for the demo: springs that shorten as they tire, measured once at the clutch cable change.
        name: 'Clutch spring free length',
        pieces: 5,
        unit: 'in',
        newMin: 1.69,
        newMax: 1.7,
        limit: 1.65,
        fittedAt: 4_800,
        readings: [{ on: '2026-07-24', odometer: 21_100, pieces: [1.676, 1.679, 1.675, 1.678, 1.677] }],
      },
    ],
  },
];

/** A small deterministic generator, so the demo's issued bottle codes are the same on every seed. */
function seededRandom(seed: number): (max: number) => number {
  let s = seed >>> 0;
  return (max) => {
    s = (Math.imul(s, 1_664_525) + 1_013_904_223) >>> 0;
    return s % max;
  };
}

export interface SeededMachines {
  machineIds: Record<string, string>;
  oilChanges: number;
  samples: number;
  wearParts: number;
}

/**
 * Writes the demo machines with their oil changes, drain-card samples (drawn and shipped, so a lab import
 * can put results in), wear parts and measurements. School bikes go to ownerUserIds in turn.
 */
export async function seedMachines(
  db: Db,
  options: { crewId: string; ownerUserIds: string[]; soloCrewId: string; soloUserId: string },
): Promise<SeededMachines> {
  if (options.ownerUserIds.length === 0) throw new Error('seedMachines needs at least one owner for the school bikes.');
  const random = seededRandom(20261202);
  const out: SeededMachines = { machineIds: {}, oilChanges: 0, samples: 0, wearParts: 0 };
  let kitNumber = 4100;
  let schoolIndex = 0;
  for (const m of DEMO_MACHINES) {
    const solo = m.key === 'wren';
    const crewId = solo ? options.soloCrewId : options.crewId;
    const owner = solo ? options.soloUserId : options.ownerUserIds[schoolIndex++ % options.ownerUserIds.length]!;
    const stored = (v: number) => toStoredMeter(v, m.meter);
    const machine = await db
      .insertInto('machines')
      .values({
        crew_id: crewId,
        owner_user_id: owner,
        name: m.name,
        model_year: m.year,
        engine_layout: m.layout,
        displacement_cc: m.cc,
        cooling: m.cooling,
        shared_oil: true,
        oil_capacity_l: m.capacityL,
        meter: m.meter,
        recommended_grades: JSON.stringify(m.grades),
        max_interval_distance: stored(m.maxInterval),
        max_interval_days: m.maxIntervalDays,
        notes: m.notes,
        created_at: new Date(`${m.changes[0]!.on}T09:00:00Z`),
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    out.machineIds[m.key] = machine.id;

    let previous: { id: string; odometer: number; grade: string; product: string } | null = null;
    for (const c of m.changes) {
      const at = new Date(`${c.on}T10:00:00Z`);
      // The sample is drawn as this change drains the previous change's oil.
      if (previous) {
        let code: string;
        if (m.codes === 'issued') {
          let data = '';
          for (let i = 0; i < 6; i++) data += CODE_ALPHABET[random(CODE_ALPHABET.length)]!;
          code = data + computeCheckSymbol(data);
        } else {
          code = `LV-${kitNumber++}`;
        }
        const sample = await db
          .insertInto('samples')
          .values({
            crew_id: crewId,
            machine_id: machine.id,
            oil_change_id: previous.id,
            bottle_code: code,
            bottle_code_norm: normaliseBottleCode(code),
            issued_code: m.codes === 'issued',
            drawn_on: c.on,
            odometer: stored(c.odometer),
            distance_on_oil: stored(c.odometer) - previous.odometer,
            top_up_l: c.topUpL ?? 0,
            sae_grade: previous.grade,
            oil_product: previous.product,
            draw_method: 'midstream',
            state: 'shipped',
            tracking_note: 'Posted with the school’s weekly mail',
            created_by: owner,
            created_at: at,
          })
          .returning('id')
          .executeTakeFirstOrThrow();
        await db
          .insertInto('sample_events')
          .values([
            { sample_id: sample.id, state: 'drawn', actor_user_id: owner, at },
            {
              sample_id: sample.id,
              state: 'shipped',
              actor_user_id: owner,
              note: 'Posted with the school’s weekly mail',
              at: new Date(at.getTime() + 86_400_000),
            },
          ])
          .execute();
        out.samples += 1;
      }
      const row = await db
        .insertInto('oil_changes')
        .values({
          crew_id: crewId,
          machine_id: machine.id,
          changed_on: c.on,
          odometer: stored(c.odometer),
          oil_product: c.product,
          sae_grade: c.grade,
          volume_l: m.capacityL,
          filter_changed: c.filter ?? true,
          top_up_l: c.topUpL ?? 0,
          other_work: JSON.stringify(c.work ?? []),
          created_by: owner,
          created_at: at,
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      previous = { id: row.id, odometer: stored(c.odometer), grade: c.grade, product: c.product };
      out.oilChanges += 1;
    }

    for (const p of m.wearParts) {
      const mm = (v: number) => toMillimetres(v, p.unit);
      const part = await db
        .insertInto('wear_parts')
        .values({
          crew_id: crewId,
          machine_id: machine.id,
          name: p.name,
          piece_count: p.pieces,
          new_min_mm: mm(p.newMin),
          new_max_mm: mm(p.newMax),
          service_limit_mm: mm(p.limit),
          limit_direction: p.direction ?? 'min',
          fitted_odometer: stored(p.fittedAt),
          manual_unit: p.unit,
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      for (const r of p.readings) {
        const values = (r.pieces ?? [r.value!]).map(mm);
        await db
          .insertInto('wear_measurements')
          .values({
            wear_part_id: part.id,
            measured_on: r.on,
            odometer: stored(r.odometer),
            pieces_mm: JSON.stringify(r.pieces ? values : []),
            summary_mm: (p.direction ?? 'min') === 'min' ? Math.min(...values) : Math.max(...values),
            created_by: owner,
          })
          .execute();
      }
      out.wearParts += 1;
    }
  }
  return out;
}
