/**
 * Wear rate: ppm per 1,000 mi or km (or per 100 engine hours) of oil use.
 *
 * Top-up correction (an approximation, and the interface says so): oil burnt or lost between changes
 * leaves carrying metal, and the fresh top-up oil dilutes what remains. Treating the top-up as extra oil
 * that has carried metal out, the metal the engine shed is about ppm × (oilVolume + topUp) / oilVolume.
 * It ignores when the top-up was added and what the filter holds back.
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

/** Wear rate of one reading; null when the oil has no distance on it. */
export function computeWearRate(
  ppm: number,
  distanceOnOil: number,
  unit: DistanceUnit,
  topUp?: { topUpVolume?: number | undefined; oilVolume?: number | undefined },
): WearRate | null {
  if (!Number.isFinite(ppm) || !Number.isFinite(distanceOnOil) || distanceOnOil <= 0) return null;
  const per = findRateBasis(unit);
  const topUpVolume = topUp?.topUpVolume ?? 0;
  const oilVolume = topUp?.oilVolume ?? 0;
  const topUpCorrected = topUpVolume > 0 && oilVolume > 0;
  const correctedPpm = topUpCorrected ? (ppm * (oilVolume + topUpVolume)) / oilVolume : ppm;
  return { rate: (correctedPpm * per) / distanceOnOil, per, unit, correctedPpm, topUpCorrected };
}
