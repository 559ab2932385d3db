/**
 * The decision a list or a page leads with: a sample's (or a machine's latest sample's) worst level and its
 * current interval call, in words. Pure: no database, no Astro.
 */
import { capitalise, describeFindingReason } from '../analysis/finding-words';
import { CALL_WORD, levelRank, type IntervalCallKind, type Level } from '../levels';
import type { Meter } from '../machines/machines';
import { fromStoredMeter, labelMeter } from '../units/units';

/** What the engine or a reviewer concluded about one sample with results. */
export interface Verdict {
  sampleId: string;
  machineId: string;
  level: Level;
  /** The sample's current call (a reviewer's over the engine's), or null before any call. */
  call: IntervalCallKind | null;
  /** The next interval of that call in stored units (km or hours), or null. */
  nextInterval: number | null;
  /** The worst finding, for a one-line reason. */
  top: { ruleId: string; measurand: string | null } | null;
}

/** How a call is drawn: shorten and fix-first ask for action sooner, hold and stretch do not. */
export type CallTone = 'urgent' | 'calm';

/** Whether a call asks the rider to act sooner than usual. */
export function callTone(call: IntervalCallKind): CallTone {
  return call === 'shorten' || call === 'fix-first' ? 'urgent' : 'calm';
}

/**
 * A distance rounded for a sentence that says "about": to 50 mi/km, to 5 hours. Common practice, no published
 * source: a lab's interval advice is not finer than that.
 */
export function roundAbout(stored: number, meter: Meter): string {
  const v = fromStoredMeter(stored, meter);
  const step = meter === 'h' ? 5 : 50;
  const rounded = Math.max(step, Math.round(v / step) * step);
  return `${rounded.toLocaleString('en-US')} ${labelMeter(meter)}`;
}

/** "Shorten to about 700 km", "Hold at about 5,000 km", "Fix first"; the bare word without a distance. */
export function describeCallWithDistance(call: IntervalCallKind, nextInterval: number | null, meter: Meter): string {
  const word = CALL_WORD[call];
  if (nextInterval === null || nextInterval <= 0 || call === 'fix-first') return word;
  const about = roundAbout(nextInterval, meter);
  return call === 'hold' ? `${word} at about ${about}` : `${word} to about ${about}`;
}

/** The one-line reason of a verdict: the worst finding in words, or that every reading is steady. */
export function describeVerdictReason(v: Pick<Verdict, 'top' | 'level'>): string {
  if (!v.top || v.level === 'steady') return 'Every reading within this engine’s normal.';
  return capitalise(describeFindingReason(v.top.ruleId, v.top.measurand));
}

/**
 * Sorts rows worst level first; rows without results come last. Ties keep `tieBreak`'s order (or the input's).
 */
export function sortWorstFirst<T>(
  rows: readonly T[],
  level: (row: T) => Level | null | undefined,
  tieBreak: (a: T, b: T) => number = () => 0,
): T[] {
  const rank = (r: T) => {
    const l = level(r);
    return l ? levelRank(l) : -1;
  };
  return rows
    .map((row, i) => ({ row, i }))
    .sort((a, b) => rank(b.row) - rank(a.row) || tieBreak(a.row, b.row) || a.i - b.i)
    .map((x) => x.row);
}
