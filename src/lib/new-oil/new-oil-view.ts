/**
 * What the new-oil screens show: figures in words, the state of a reference, and the list page's model.
 * Pure: no database, no Astro.
 */
import { getMeasurand, MEASURAND_CODES, type MeasurandCode } from '../analysis/measurands';
import type { Reading } from '../analysis/types';
import { hasFigures, type NewOilReference } from './new-oil';
import type { ProductInUse } from './new-oil.service';
import { formatDay, formatMomentDay } from '../words/dates';

const UNITS: Partial<Record<MeasurandCode, string>> = {
  KV40: 'mm²/s',
  KV100: 'mm²/s',
  TBN: 'mg KOH/g',
  TAN: 'mg KOH/g',
  FLASH: '°C',
  FUEL: '%',
  WATER: '%',
  INSOL: '%',
  VI: '',
};

/**
 * One reading of a reference as text: "KV100 14.2 mm²/s", "Zn 1,100 ppm", "B <1 ppm". Keeps two decimals below 100
 * (a data sheet's figures as printed), unlike formatFigure's rounding for judged figures.
 */
export function formatReferenceReading(code: MeasurandCode, r: Reading): string {
  const unit = UNITS[code] ?? (getMeasurand(code).unit === 'ppm' ? 'ppm' : getMeasurand(code).unit);
  const n = Math.abs(r.value) >= 100 ? Math.round(r.value).toLocaleString('en-US') : String(Number(r.value.toFixed(2)));
  return `${code} ${r.qualifier ?? ''}${n}${unit ? ` ${unit}` : ''}`;
}

/** A reference's figures in catalogue order, joined for one line. */
export function describeReadings(readings: Partial<Record<MeasurandCode, Reading>>): string {
  return MEASURAND_CODES.flatMap((c) => (readings[c] ? [formatReferenceReading(c, readings[c]!)] : [])).join(' · ');
}

/** Where a reference stands, in words; when it was saved is the day in the reader's `timeZone`. */
export function describeReferenceState(ref: NewOilReference, timeZone: string | null | undefined): string {
  if (ref.source === 'data-sheet') return `Saved ${formatMomentDay(ref.updatedAt, timeZone)}`;
  if (!hasFigures(ref))
    return `Bottle ${ref.bottleCode} is at the lab: its results are written here when the lab’s file is imported.`;
  return `Bottle ${ref.bottleCode}, results of ${ref.resultsOn ? formatDay(ref.resultsOn) : '—'}`;
}

/** The sentence shown where a product has no reference with figures. */
export const FIRST_SAMPLES_SERVE =
  'No new-oil reference yet: the first samples of this oil serve as its reference instead — the rules compare later samples with them, and the viscosity rule can only judge against the grade’s SAE window.';

export interface ReferenceListItem {
  productKey: string;
  productName: string;
  saeGrade: string;
  /** How many of the crew's machines had this product poured (0: recorded, not yet poured). */
  machines: number;
  references: NewOilReference[];
  /** True when a reference with figures exists (what the analysis reads). */
  inUse: boolean;
}

/**
 * The list page: every product with a reference or poured on a machine, those without figures first (they
 * need attention), then by name.
 */
export function buildReferenceList(
  references: readonly NewOilReference[],
  products: readonly ProductInUse[],
): ReferenceListItem[] {
  const byKey = new Map<string, ReferenceListItem>();
  for (const p of products)
    byKey.set(p.productKey, {
      productKey: p.productKey,
      productName: p.productName,
      saeGrade: p.saeGrade,
      machines: p.machines,
      references: [],
      inUse: false,
    });
  for (const r of references) {
    const item = byKey.get(r.productKey) ?? {
      productKey: r.productKey,
      productName: r.productName,
      saeGrade: r.saeGrade,
      machines: 0,
      references: [],
      inUse: false,
    };
    item.references.push(r);
    if (r.saeGrade && !item.saeGrade) item.saeGrade = r.saeGrade;
    byKey.set(r.productKey, item);
  }
  const items = [...byKey.values()].map((i) => ({ ...i, inUse: i.references.some(hasFigures) }));
  return items.sort((a, b) => Number(a.inUse) - Number(b.inUse) || a.productName.localeCompare(b.productName, 'en'));
}

/** The address of the form for a product, prefilled. */
export function newReferenceHref(
  productName: string,
  saeGrade = '',
  source: 'data-sheet' | 'lab' = 'data-sheet',
): string {
  const q = new URLSearchParams({ source });
  if (productName) q.set('product', productName);
  if (saeGrade) q.set('grade', saeGrade);
  return `/oil-references/new?${q.toString()}`;
}

/** A reference as the edit form's values. */
export function referenceFormValues(ref: NewOilReference): Record<string, string> {
  const out: Record<string, string> = {
    productName: ref.productName,
    saeGrade: ref.saeGrade,
    note: ref.note,
    bottleCode: ref.bottleCode ?? '',
  };
  if (ref.source === 'data-sheet')
    for (const [code, r] of Object.entries(ref.readings)) if (code !== 'VI' && r) out[code] = String(r.value);
  return out;
}
