/**
 * New-oil references: the oil as poured, per crew and oil product. Types, input schemas and the pure pieces
 * that turn stored references into what the analysis engine reads (SamplePoint.newOil and .newOilKv100).
 * Row types (snake_case) live in src/lib/db/database.ts.
 */
import { z } from 'zod';
import { getMeasurand, isMeasurandCode, type MeasurandCode } from '../analysis/measurands';
import type { Reading, SamplePoint } from '../analysis/types';
import { viscosityIndex } from '../analysis/viscosity';
import type { NewOilReferenceRow } from '../db/database';
import { text } from '~/lib/http/form-values';
import { normaliseBottleCode } from '../samples/bottle-code';

export type NewOilSource = 'lab' | 'data-sheet';

export const SOURCE_LABELS: Record<NewOilSource, string> = { 'data-sheet': 'Data sheet', lab: 'Lab sample of new oil' };

/** A new-oil reference as screens and services use it. */
export interface NewOilReference {
  id: string;
  productName: string;
  productKey: string;
  source: NewOilSource;
  saeGrade: string;
  readings: Partial<Record<MeasurandCode, Reading>>;
  /** Lab references: the bottle of new oil the lab's row is matched by. */
  bottleCode: string | null;
  /** Lab references: the day the results came (null while the bottle is at the lab). */
  resultsOn: string | null;
  note: string;
  updatedAt: Date;
}

/**
 * The key samples are matched by: the product name trimmed, without case, and with every run of spaces
 * made one ("Trail  10W-40 " and "trail 10w-40" are one product). Unicode compatibility forms are folded
 * first so a full-width or non-breaking space counts as a space.
 */
export function normaliseProductName(name: string): string {
  return name.normalize('NFKC').replace(/\s+/g, ' ').trim().toLowerCase();
}

/** Maps a new_oil_references row. Unknown measurand keys in the stored JSON are dropped. */
export function toNewOilReference(row: NewOilReferenceRow): NewOilReference {
  const readings: Partial<Record<MeasurandCode, Reading>> = {};
  for (const [code, r] of Object.entries(row.readings ?? {})) {
    if (!isMeasurandCode(code) || typeof r?.value !== 'number') continue;
    readings[code] =
      r.qualifier === '<' || r.qualifier === '>' ? { value: r.value, qualifier: r.qualifier } : { value: r.value };
  }
  return {
    id: row.id,
    productName: row.product_name,
    productKey: row.product_key,
    source: row.source,
    saeGrade: row.sae_grade,
    readings,
    bottleCode: row.bottle_code,
    resultsOn: row.results_on,
    note: row.note,
    updatedAt: row.updated_at,
  };
}

/** True when a reference has figures to compare against (a lab bottle still at the lab has none). */
export function hasFigures(ref: Pick<NewOilReference, 'readings'>): boolean {
  return Object.keys(ref.readings).length > 0;
}

// ---- input ----

/**
 * Figures a data sheet gives, in the form's order. Additives are the elements oils are blended with
 * (PRODUCT.md's additive set plus boron and sodium, which many motorcycle oils also carry).
 */
export const DATA_SHEET_ADDITIVES = [
  'Ca',
  'Mg',
  'Zn',
  'P',
  'Mo',
  'B',
  'Na',
  'Ba',
  'S',
] as const satisfies readonly MeasurandCode[];
export const DATA_SHEET_CONDITION = ['KV100', 'KV40', 'TBN'] as const satisfies readonly MeasurandCode[];
export const DATA_SHEET_FIELDS: readonly MeasurandCode[] = [...DATA_SHEET_CONDITION, ...DATA_SHEET_ADDITIVES];

/**
 * Believable ranges for a data sheet's figures. Viscosity: ASTM D2270 starts at 2.0 mm²/s at 100 °C, and no
 * motorcycle engine or gearbox oil comes near 100 mm²/s at 100 °C or 2,000 mm²/s at 40 °C (SAE J300 ends at
 * 26.1; J306 gear oils stay under 50). TBN: fresh engine oils sit around 5–15 mg KOH/g, 50 leaves room for
 * marine cylinder oils. Additives: no element of an engine oil's additive pack comes near 20,000 ppm (2 %).
 * Ceilings are common practice, no published source; they catch a slipped decimal point or unit.
 */
export const FIGURE_RANGES: Record<(typeof DATA_SHEET_FIELDS)[number], { min: number; max: number; unit: string }> =
  Object.fromEntries(
    DATA_SHEET_FIELDS.map((code) => [
      code,
      code === 'KV100'
        ? { min: 2, max: 100, unit: 'mm²/s' }
        : code === 'KV40'
          ? { min: 2, max: 2000, unit: 'mm²/s' }
          : code === 'TBN'
            ? { min: 0, max: 50, unit: 'mg KOH/g' }
            : { min: 0, max: 20_000, unit: 'ppm' },
    ]),
  ) as Record<MeasurandCode, { min: number; max: number; unit: string }>;

/**
 * A figure from a form or JSON: '' is absent; a decimal comma is read as a point when it is the only
 * separator ("14,2" → 14.2, as many data sheets print it); "1,100" with three digits after the comma is a
 * thousands separator.
 */
function readFigure(v: unknown): unknown {
  if (typeof v !== 'string') return v ?? undefined;
  const s = v.trim().replace(/\s/g, '');
  if (s === '') return undefined;
  const t = /^\d+,\d{3}$/.test(s) ? s.replace(',', '') : /^\d*,\d+$/.test(s) ? s.replace(',', '.') : s;
  const n = Number(t);
  return Number.isNaN(n) ? v : n;
}

function figure(code: MeasurandCode) {
  const r = FIGURE_RANGES[code]!;
  const name = getMeasurand(code).name;
  return z.preprocess(
    readFigure,
    z
      .number({
        error: `${name} must be a number, such as ${code === 'KV100' ? '14.2' : code === 'KV40' ? '98' : code === 'TBN' ? '8.5' : '1100'}.`,
      })
      .refine(Number.isFinite, `${name} must be a number.`)
      .refine((n) => n >= r.min, `${name} cannot be below ${r.min} ${r.unit}.`)
      .refine(
        (n) => n <= r.max,
        `${name} above ${r.max.toLocaleString('en-US')} ${r.unit} is not an engine oil's figure; check the unit and the decimal point.`,
      )
      .optional(),
  );
}

const figuresShape = Object.fromEntries(DATA_SHEET_FIELDS.map((c) => [c, figure(c)])) as Record<
  MeasurandCode,
  ReturnType<typeof figure>
>;

const productName = text(120, 'oil product').pipe(
  z.string().min(1, 'Name the oil product as on the bottle, e.g. Tarnwell 10W-40 Semi-Synthetic.'),
);
const saeGradeText = text(20, 'SAE grade');
const note = text(500, 'note');

/** A data-sheet reference: the product, its grade, and the figures typed from its data sheet. */
export const dataSheetInputSchema = z
  .object({
    source: z.literal('data-sheet'),
    productName,
    saeGrade: saeGradeText,
    note,
    ...figuresShape,
  })
  .superRefine((v, ctx) => {
    const given = DATA_SHEET_FIELDS.filter((c) => v[c] !== undefined);
    if (given.length === 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['KV100'],
        message:
          'Enter at least one figure from the data sheet; the viscosity at 100 °C is the one the viscosity rule uses.',
      });
    }
    const kv40 = v.KV40;
    const kv100 = v.KV100;
    if (kv40 !== undefined && kv100 !== undefined && kv40 <= kv100) {
      ctx.addIssue({
        code: 'custom',
        path: ['KV40'],
        message: `The viscosity at 40 °C (${kv40}) must be higher than the one at 100 °C (${kv100}): oil thins as it warms. Check whether the two were swapped.`,
      });
    }
  });

/** A lab reference: the product, its grade and the code of the bottle of new oil sent to the lab. */
export const labInputSchema = z.object({
  source: z.literal('lab'),
  productName,
  saeGrade: saeGradeText,
  note,
  bottleCode: text(64, 'bottle code')
    .pipe(z.string().min(1, 'Enter the code on the bottle of new oil sent to the lab.'))
    .refine((c) => normaliseBottleCode(c).length > 0, 'A bottle code needs letters or digits.'),
});

/** What a form or a JSON body may send; `source` picks the shape. */
export const newOilInputSchema = z.discriminatedUnion('source', [dataSheetInputSchema, labInputSchema], {
  error: 'Choose where the figures come from: the data sheet or a lab sample of the new oil.',
});
export type NewOilInput = z.infer<typeof newOilInputSchema>;

/** The readings a data-sheet input stores; the viscosity index is worked out (ASTM D2270) when both viscosities are given. */
export function readingsFromDataSheet(
  input: Extract<NewOilInput, { source: 'data-sheet' }>,
): Partial<Record<MeasurandCode, Reading>> {
  const out: Partial<Record<MeasurandCode, Reading>> = {};
  for (const code of DATA_SHEET_FIELDS) {
    const v = input[code as keyof typeof input];
    if (typeof v === 'number') out[code] = { value: v };
  }
  if (out.KV40 && out.KV100) {
    try {
      out.VI = { value: viscosityIndex(out.KV40.value, out.KV100.value) };
    } catch (e) {
      // Outside D2270's table: no VI, the viscosities still stand.
      if (!(e instanceof RangeError)) throw e;
    }
  }
  return out;
}

// ---- the analysis input ----

/** What the engine is given for samples of one oil product. */
export interface NewOilForAnalysis {
  newOil: NonNullable<SamplePoint['newOil']>;
  newOilKv100: number | undefined;
}

/** Per product key, what the engine is given. */
export type NewOilLookup = ReadonlyMap<string, NewOilForAnalysis>;

/**
 * One product's references → the engine's input. A lab sample of the new oil wins over the data sheet (it
 * is the oil actually poured, measured the way the used samples are); a lab bottle without results yet does
 * not count. The KV100 comes from the chosen reference, else from the other one.
 */
export function chooseNewOilForAnalysis(
  refs: readonly Pick<NewOilReference, 'source' | 'readings'>[],
): NewOilForAnalysis | null {
  const withFigures = refs.filter(hasFigures);
  const chosen = withFigures.find((r) => r.source === 'lab') ?? withFigures.find((r) => r.source === 'data-sheet');
  if (!chosen) return null;
  const kv100 = chosen.readings.KV100?.qualifier === undefined ? chosen.readings.KV100?.value : undefined;
  const fallback = withFigures.find((r) => r !== chosen && r.readings.KV100 && r.readings.KV100.qualifier === undefined)
    ?.readings.KV100?.value;
  return { newOil: { source: chosen.source, readings: { ...chosen.readings } }, newOilKv100: kv100 ?? fallback };
}

/** The crew's references grouped by product key, as the engine will read them. */
export function buildNewOilLookup(
  refs: readonly Pick<NewOilReference, 'productKey' | 'source' | 'readings'>[],
): NewOilLookup {
  const byKey = new Map<string, Pick<NewOilReference, 'source' | 'readings'>[]>();
  for (const r of refs) byKey.set(r.productKey, [...(byKey.get(r.productKey) ?? []), r]);
  const out = new Map<string, NewOilForAnalysis>();
  for (const [key, list] of byKey) {
    const chosen = chooseNewOilForAnalysis(list);
    if (chosen) out.set(key, chosen);
  }
  return out;
}

/** A sample point with the new-oil reference of its oil product filled in, when the crew recorded one. */
export function attachNewOil(point: SamplePoint, lookup: NewOilLookup): SamplePoint {
  if (!point.oilProduct) return point;
  const found = lookup.get(normaliseProductName(point.oilProduct));
  if (!found) return point;
  return { ...point, newOil: found.newOil, newOilKv100: found.newOilKv100 };
}
