/**
 * Wear chart types and picker groups: no zod and no analysis engine here, so the React island that imports
 * them stays small.
 */
import type { MeasurandCode, MeasurandGroup } from '../analysis/measurands';
import type { Level } from '../levels';
import type { MeterUnit } from '../units/units';

export type TrendBasis = 'ppm' | 'rate';
export type TrendAxis = 'odometer' | 'date';

/** One sample as the repository loads it: stored units (km or h, litres). */
export interface TrendSampleRow {
  id: string;
  bottleCode: string;
  drawnOn: string;
  odometerStored: number;
  distanceOnOilStored: number | null;
  grade: string | null;
  topUpL: number;
  oilVolumeL: number | null;
  inBaseline: boolean;
  /** Why the sample is out of the baseline (a lead's or mechanic's reason, or break-in), when it is. */
  baselineNote: string | null;
  readings: Partial<Record<MeasurandCode, { value: number; qualifier: '<' | '>' | null }>>;
  /** The bands the rules used when this sample was judged (ready bands only), as stored. */
  bands: Partial<Record<MeasurandCode, StoredBand>>;
  /** Worst stored finding level per measurand of this sample. */
  levels: Partial<Record<MeasurandCode, Level>>;
}

/** A baseline band as the engine stored it: on its own basis (a rate or ppm), with the factor back to ppm. */
export interface StoredBand {
  basis: 'rate' | 'ppm';
  n: number;
  mean: number;
  lower: number;
  watchAbove: number;
  actFrom: number;
  toReported: number;
  /** 'crew' while the machine's own baseline builds: the crew's other machines of the same engine, with its label. */
  source: 'own' | 'crew';
  sourceLabel: string | null;
}

export interface TrendOilChangeRow {
  changedOn: string;
  odometerStored: number;
  grade: string;
}

export interface TrendPoint {
  sampleId: string;
  bottleCode: string;
  date: string;
  /** Odometer in the machine's meter unit. */
  odometer: number;
  distanceOnOil: number | null;
  grade: string | null;
  /** The plotted value in the response's basis (ppm, or ppm per 1,000 mi/km / 100 h). */
  value: number;
  /** The reading as the lab reported it, with its qualifier ('<1' means below detection). */
  reported: number;
  qualifier: '<' | '>' | null;
  level: Level;
  /** The band the rules used for this sample (from the previous in-control samples), or null while it is building. */
  band: {
    lower: number;
    mean: number;
    upper: number;
    actFrom: number;
    n: number;
    source: 'own' | 'crew';
    sourceLabel: string | null;
  } | null;
  /** value − band mean, and that as a share of the band's upper half-width (1 = at the watch edge), when a band exists. */
  fromBaseline: { delta: number; spreads: number } | null;
  /** False when the sample is kept out of the baseline; `baselineNote` says why. */
  inBaseline: boolean;
  baselineNote: string | null;
}

export interface TrendSeries {
  code: MeasurandCode;
  name: string;
  group: MeasurandGroup;
  /** Unit of `value`: 'ppm', 'ppm per 1,000 km', '%', 'mm²/s'… */
  unit: string;
  /** Oil-condition figures have no wear rate: they stay in their own unit whatever the basis. */
  basis: TrendBasis;
  points: TrendPoint[];
}

export interface GradeChangeMark {
  date: string;
  odometer: number;
  from: string;
  to: string;
}

export interface TrendResponse {
  machine: { id: string; name: string; meter: MeterUnit };
  basis: TrendBasis;
  x: TrendAxis;
  series: TrendSeries[];
  gradeChanges: GradeChangeMark[];
  /** Said beside the chart whenever a rate is shown (PRODUCT.md: the correction is an approximation). */
  notes: string[];
}

/** Elements of the picker, grouped as the wear chart shows them. */
export const PICKER_GROUPS: readonly { group: MeasurandGroup; label: string }[] = [
  { group: 'wear', label: 'Wear metals' },
  { group: 'contaminant', label: 'Contaminants' },
  { group: 'additive', label: 'Additives' },
  { group: 'condition', label: 'Oil condition' },
];
