/** Invented sample histories for the analysis tests (no real machines, labs or oils). */
import type { MeasurandCode } from '~/lib/analysis/measurands';
import type { MachineProfile, SamplePoint } from '~/lib/analysis/types';

export const AIR_SINGLE: MachineProfile = { cooling: 'air', distanceUnit: 'km', maxIntervalDistance: 6000 };
export const LIQUID_TWIN: MachineProfile = {
  cooling: 'liquid',
  distanceUnit: 'km',
  maxIntervalDistance: 10000,
  maxIntervalDays: 365,
};

const START = Date.parse('2023-03-01T00:00:00Z');

/** Sample number i of an invented machine: every 60 days, `interval` km on the oil each time. */
export function makeSample(
  i: number,
  readings: Partial<Record<MeasurandCode, number>>,
  extra: Partial<SamplePoint> = {},
  interval = 3000,
): SamplePoint {
  const r: SamplePoint['readings'] = {};
  for (const [code, value] of Object.entries(readings) as [MeasurandCode, number][]) r[code] = { value };
  return {
    id: `s${i}`,
    takenAt: new Date(START + i * 60 * 86_400_000).toISOString().slice(0, 10),
    odometer: (i + 1) * interval,
    distanceOnOil: interval,
    grade: '10W-40',
    oilProduct: 'Valley Trail 10W-40',
    readings: r,
    ...extra,
  };
}

/** A history from a list of reading sets, oldest first. */
export function makeHistory(
  sets: Partial<Record<MeasurandCode, number>>[],
  extra: Partial<SamplePoint> = {},
  interval = 3000,
): SamplePoint[] {
  return sets.map((readings, i) => makeSample(i, readings, extra, interval));
}
