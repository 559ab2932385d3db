/**
 * The crew reference: while a machine's own baseline builds, its bands come from the crew's other machines with
 * the same engine. This file says which machines count as the same engine and how the reference is labelled; the
 * band itself is built by buildBaselineBands with the same rules as a machine's own band.
 */
import { CREW_REFERENCE } from './rule-definitions';
import type { Cooling, DistanceUnit } from './types';

export type EngineLayout = 'single' | 'twin' | 'triple' | 'four' | 'other';

/** What makes two machines "the same engine" for a crew reference. */
export interface EngineDescription {
  layout: EngineLayout;
  /** Displacement in cc; unknown displacement never matches. */
  displacementCc: number | null;
  cooling: Cooling;
  /** Engine, gearbox and clutch share one oil. */
  sharedOil: boolean;
  /** The machine's meter: an hour meter and an odometer give rates no one can compare. */
  distanceUnit: DistanceUnit;
}

/**
 * True when `other` has the same engine as `machine`: same layout, cooling and shared-sump setting, displacement
 * within CREW_REFERENCE.params.displacementTolerance of the machine's, and both on hours or both on distance.
 */
export function isSameEngine(machine: EngineDescription, other: EngineDescription): boolean {
  if (machine.layout !== other.layout || machine.cooling !== other.cooling || machine.sharedOil !== other.sharedOil)
    return false;
  if ((machine.distanceUnit === 'h') !== (other.distanceUnit === 'h')) return false;
  const a = machine.displacementCc;
  const b = other.displacementCc;
  if (a === null || b === null || !(a > 0) || !(b > 0)) return false;
  // Rounded to 1e-9 so exactly 5 % (e.g. 450 against 472.5) counts as within.
  return Math.round((Math.abs(b - a) / a) * 1e9) / 1e9 <= CREW_REFERENCE.params.displacementTolerance;
}

const LAYOUT_WORDS: Record<EngineLayout, string> = {
  single: 'singles',
  twin: 'twins',
  triple: 'triples',
  four: 'fours',
  other: 'engines',
};

/** "450 cc liquid-cooled singles": how riders name an engine family. */
export function describeEngine(engine: Pick<EngineDescription, 'layout' | 'displacementCc' | 'cooling'>): string {
  const cc =
    engine.displacementCc !== null && engine.displacementCc > 0 ? `${Math.round(engine.displacementCc)} cc ` : '';
  return `${cc}${engine.cooling}-cooled ${LAYOUT_WORDS[engine.layout]}`;
}

/** The label every screen shows beside a crew reference band. */
export function crewReferenceLabel(engine: Pick<EngineDescription, 'layout' | 'displacementCc' | 'cooling'>): string {
  return `from the crew's other ${describeEngine(engine)}`;
}
