/** Plain types shared by the analysis engine. No database or framework types here. */
import type { MeasurandCode } from './measurands';

import type { Level } from '../levels';
import type { Cooling, Meter } from '../machines/machines';

export type { Cooling, Level };
/** Distance unit of the machine: miles, kilometres, or engine hours from an hour meter. */
export type DistanceUnit = Meter;

export interface Reading {
  value: number;
  /** '<' below detection (value is the detection limit), '>' above the lab's range. */
  qualifier?: '<' | '>' | undefined;
}

export interface SamplePoint {
  id: string;
  /** ISO date (YYYY-MM-DD or full ISO timestamp) the oil was drawn. */
  takenAt: string;
  /** Machine odometer (or hour meter) when drawn. */
  odometer: number;
  /** Distance (or hours) the sampled oil had run: odometer now − odometer at the oil change. */
  distanceOnOil: number;
  /** Fresh oil added since the oil change, same volume unit as oilVolume. */
  topUpVolume?: number | undefined;
  /** Oil fill volume of the engine. */
  oilVolume?: number | undefined;
  /** SAE grade poured, e.g. '10W-40'. */
  grade?: string | undefined;
  /** Oil product as entered on the oil change (free text). */
  oilProduct?: string | undefined;
  /** KV100 of the same oil new (mm²/s), from the data sheet or a new-oil sample, if known. */
  newOilKv100?: number | undefined;
  /** The oil as poured: a new-oil reference from a lab sample or the data sheet, when one was recorded for this oil product. */
  newOil?: { source: 'lab' | 'data-sheet'; readings: Partial<Record<MeasurandCode, Reading>> } | undefined;
  /** Taken out of the baseline by a lead or mechanic (or break-in oil), with their reason: judged, but never a baseline for later samples. */
  baselineExcluded?: { reason: string; breakIn?: boolean | undefined } | undefined;
  /** ISO date the lab's results arrived; "next sample by" dates count from the later of this and takenAt. */
  resultsOn?: string | undefined;
  readings: Partial<Record<MeasurandCode, Reading>>;
}

export interface MachineProfile {
  cooling: Cooling;
  distanceUnit: DistanceUnit;
  /** Manufacturer's longest allowed oil change interval, in distanceUnit. */
  maxIntervalDistance?: number | undefined;
  /** Manufacturer's longest allowed oil change interval in days (the calendar limit). */
  maxIntervalDays?: number | undefined;
  /** Engine, gearbox and wet clutch share one oil (most motorcycles); friction modifiers then matter. */
  sharedOil?: boolean | undefined;
  /**
   * The crew's other machines with the same engine (see crew-reference.ts), used only while this machine's own
   * band is still building. Absent: no crew reference.
   */
  crewReference?: CrewReference | undefined;
}

/** A sample of another machine of the crew, already in this machine's distance unit. */
export interface CrewReferenceSample extends SamplePoint {
  machineId: string;
  /** Measurands that were act on this sample when its own machine was judged: never part of a reference band. */
  outOfBaseline?: ReadonlySet<MeasurandCode> | undefined;
}

export interface CrewReference {
  /** "from the crew's other 450 cc liquid-cooled singles". */
  label: string;
  /** The crew's other machines of this engine, their samples oldest first (by takenAt). */
  samples: readonly CrewReferenceSample[];
}

/** Fixed alarm limits a crew lead can change. Elements in ppm; the rest as named. */
export interface FixedLimits {
  Fe: number;
  Cr: number;
  Cu: number;
  Sn: number;
  Al: number;
  Pb: number;
  B: number;
  Si: number;
  /** KV100 may differ from the same oil new by at most this many percent either way. */
  kv100ChangePercent: number;
  /** Fuel dilution, % (act at or above). */
  fuelPercent: number;
  /** Water, % (act at or above). */
  waterPercent: number;
}

export type FixedLimitElement = 'Fe' | 'Cr' | 'Cu' | 'Sn' | 'Al' | 'Pb' | 'B' | 'Si';

export type RuleId =
  | 'baseline-jump'
  | 'climbing-trend'
  | 'fixed-limit'
  | 'viscosity-grade'
  | 'fuel-dilution'
  | 'coolant-markers'
  | 'dirt'
  | 'additive-mismatch'
  | 'viscosity-change'
  | 'condition-trend'
  | 'flash-point'
  | 'clutch-friction';

export interface Finding {
  ruleId: RuleId;
  level: Exclude<Level, 'steady'>;
  /** The measurands the finding is about; the first is the main one. */
  measurands: MeasurandCode[];
  /**
   * A measurand's own level inside the finding when it is milder than the finding's: a reading is marked only as
   * far as its own figures go (aluminium in a dirt finding that silicon made act is still only up, not at act).
   */
  levels?: Partial<Record<MeasurandCode, Exclude<Level, 'steady'>>>;
  /** The numbers behind the call, named, so the interface can show how it was made. */
  numbers: Record<string, number>;
  /** One plain sentence a rider understands, worded as advice. */
  sentence: string;
}

export interface AnalyseInput {
  machine: MachineProfile;
  /** Previous accepted samples of this machine, oldest first. */
  history: readonly SamplePoint[];
  sample: SamplePoint;
  limits?: Partial<FixedLimits> | undefined;
  /**
   * Measurands of earlier samples that stay out of the baseline because they were act on them (filled by the
   * replay, judgeHistory); samples marked baselineExcluded stay out whatever this says.
   */
  outOfBaseline?: ReadonlyMap<string, ReadonlySet<MeasurandCode>> | undefined;
}
