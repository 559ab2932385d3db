/**
 * Wear rate: ppm per 1,000 mi or km (or per 100 engine hours) of oil use, corrected for top-up oil.
 *
 * Top-up correction by mass balance (an approximation, and the interface says so). Take a sump of V litres
 * kept full: oil is lost (burnt, leaked) at a steady pace and made up with fresh oil, T litres in all over a
 * run of D. The engine sheds metal at a steady w (mass per distance); the lost oil carries the concentration
 * the sump had at that moment, which grows from 0 towards the final c — on average about half of it, not all
 * of it. With loss per distance L = T / D:
 *     V · dc/dx = w − L · c      ⇒      c(D) = (w / L) · (1 − e^(−T/V))
 * so the metal shed over the run, per litre of sump, is
 *     w · D / V = c · (T/V) / (1 − e^(−T/V))     ≈ c · (1 + T / (2V)) for small top-ups.
 * Treating the lost oil as if it carried the final concentration (c · (1 + T/V)) over-corrects by about
 * twice. The model ignores when the top-up was actually added and what the filter holds back.
 */
import type { DistanceUnit } from './types';

export interface WearRate {
  /** ppm per `per` units of oil use. */
  rate: number;
  /** 1000 for mi and km, 100 for hours. */
  per: number;
  unit: DistanceUnit;
  /** The ppm the rate was computed from, after the top-up correction when applied. */
  correctedPpm: number;
  topUpCorrected: boolean;
}

/** The distance (or hours) a wear rate is expressed per: 1,000 mi or km, 100 h. */
export function findRateBasis(unit: DistanceUnit): number {
  return unit === 'h' ? 100 : 1000;
}

/** The mass-balance top-up factor: metal shed ÷ metal still in the sump (1 without a top-up). */
export function computeTopUpFactor(topUpVolume: number | undefined, oilVolume: number | undefined): number {
  const t = topUpVolume ?? 0;
  const v = oilVolume ?? 0;
  if (!(t > 0) || !(v > 0)) return 1;
  const r = t / v;
  // (T/V) / (1 − e^(−T/V)); expm1 keeps it exact for tiny top-ups.
  return r / -Math.expm1(-r);
}

/** Wear rate of one reading; null when the oil has no distance on it. */
export function computeWearRate(
  ppm: number,
  distanceOnOil: number,
  unit: DistanceUnit,
  topUp?: { topUpVolume?: number | undefined; oilVolume?: number | undefined },
): WearRate | null {
  if (!Number.isFinite(ppm) || !Number.isFinite(distanceOnOil) || distanceOnOil <= 0) return null;
  const per = findRateBasis(unit);
  const factor = computeTopUpFactor(topUp?.topUpVolume, topUp?.oilVolume);
  const correctedPpm = ppm * factor;
  return { rate: (correctedPpm * per) / distanceOnOil, per, unit, correctedPpm, topUpCorrected: factor !== 1 };
}
