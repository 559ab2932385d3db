/**
 * The wear chart's data as PostgreSQL sends it (findTrendSnapshot): one JSON text of positional arrays, read here
 * into the rows the pure shaping of trends.ts works on. Positions, not names, keep the text small and quick to
 * build and hash; this file and the query are the only two places that know them.
 *
 *   [ [machineId, name, meter, oilCapacityL],
 *     [ [sampleId, bottleCode, drawnOn, odometer, distanceOnOil, grade, topUpL, inBaseline, baselineNote,
 *        breakIn, oilChangeVolumeL], ... ],   oldest first
 *     [ [sampleId, measurand, value, qualifier], ... ],
 *     [ [sampleId, measurand, level], ... ],
 *     [ [sampleId, measurand, basis, n, mean, lower, watchAbove, actFrom, toReported, source, sourceLabel], ... ],
 *     [ [changedOn, odometer, grade], ... ] ]
 */
import { isMeasurandCode } from '../analysis';
import type { Level } from '../db/database';
import { levelRank } from '../levels';
import type { MeterUnit } from '../units/units';
import type { StoredBand, TrendOilChangeRow, TrendSampleRow } from './trend-types';

type MachineTuple = [id: string, name: string, meter: MeterUnit, oilCapacityL: number | null];
type SampleTuple = [
  id: string,
  bottleCode: string,
  drawnOn: string,
  odometer: number,
  distanceOnOil: number | null,
  grade: string | null,
  topUpL: number,
  inBaseline: boolean,
  baselineNote: string | null,
  breakIn: boolean,
  oilChangeVolumeL: number | null,
];
type ReadingTuple = [sampleId: string, measurand: string, value: number, qualifier: '<' | '>' | null];
type FindingTuple = [sampleId: string, measurand: string, level: Level];
type BandTuple = [
  sampleId: string,
  measurand: string,
  basis: StoredBand['basis'],
  n: number,
  mean: number,
  lower: number,
  watchAbove: number,
  actFrom: number,
  toReported: number,
  source: StoredBand['source'],
  sourceLabel: string | null,
];
type OilChangeTuple = [changedOn: string, odometer: number, grade: string];

type SnapshotTuple = [MachineTuple, SampleTuple[], ReadingTuple[], FindingTuple[], BandTuple[], OilChangeTuple[]];

export interface TrendSnapshot {
  machine: { id: string; name: string; meter: MeterUnit; oilCapacityL: number | null };
  /** Samples with results, oldest first, with the snapshot's readings, bands and worst finding levels. */
  samples: TrendSampleRow[];
  /** The machine's oil changes by odometer. */
  changes: TrendOilChangeRow[];
}

/** Reads the snapshot text; throws when it is not the layout above (a query and this file out of step). */
export function parseTrendSnapshot(text: string): TrendSnapshot {
  const parsed: unknown = JSON.parse(text);
  if (!Array.isArray(parsed) || parsed.length !== 6 || !parsed.every(Array.isArray))
    throw new Error('The wear chart snapshot is not in the expected layout.');
  const [machine, samples, readings, findings, bands, changes] = parsed as SnapshotTuple;
  const [machineId, name, meter, oilCapacityL] = machine;
  const byId = new Map<string, TrendSampleRow>();
  for (const [
    id,
    bottleCode,
    drawnOn,
    odometer,
    distanceOnOil,
    grade,
    topUpL,
    inBaseline,
    note,
    breakIn,
    volumeL,
  ] of samples) {
    byId.set(id, {
      id,
      bottleCode,
      drawnOn,
      odometerStored: odometer,
      distanceOnOilStored: distanceOnOil,
      grade,
      topUpL,
      // The oil poured at the sample's oil change, else the machine's capacity.
      oilVolumeL: volumeL ?? oilCapacityL,
      inBaseline,
      // An empty note counts as none: the reason falls back to break-in or the plain exclusion.
      baselineNote: inBaseline ? null : note || (breakIn ? 'Break-in oil.' : 'Kept out of the baseline.'),
      readings: {},
      bands: {},
      levels: {},
    });
  }
  for (const [sampleId, measurand, value, qualifier] of readings) {
    const row = byId.get(sampleId);
    if (row && isMeasurandCode(measurand)) row.readings[measurand] = { value, qualifier };
  }
  for (const [
    sampleId,
    measurand,
    basis,
    n,
    mean,
    lower,
    watchAbove,
    actFrom,
    toReported,
    source,
    sourceLabel,
  ] of bands) {
    const row = byId.get(sampleId);
    if (row && isMeasurandCode(measurand))
      row.bands[measurand] = { basis, n, mean, lower, watchAbove, actFrom, toReported, source, sourceLabel };
  }
  for (const [sampleId, measurand, level] of findings) {
    const row = byId.get(sampleId);
    if (!row || !isMeasurandCode(measurand)) continue;
    if (levelRank(level) > levelRank(row.levels[measurand] ?? 'steady')) row.levels[measurand] = level;
  }
  return {
    machine: { id: machineId, name, meter, oilCapacityL },
    samples: [...byId.values()],
    changes: changes.map(([changedOn, odometer, grade]) => ({ changedOn, odometerStored: odometer, grade })),
  };
}
