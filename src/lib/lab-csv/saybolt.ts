/**
 * Saybolt Universal Seconds ↔ kinematic viscosity, after the equation of ASTM D2161.
 * The import needs the inverse (a lab may report viscosity at 210 °F in SUS); the standard gives
 * only the forward equation, so the inverse is found by bisection on that equation.
 */

/**
 * Lowest SUS the reader converts. ASTM D2161 tabulates SUS from 32.0 upward (about 1.8 mm²/s);
 * below that the equation is not meant to be used. (Value from memory of the D2161 table.)
 */
export const MIN_CONVERTIBLE_SUS = 32;

/** Reference temperature of the D2161 equation, °F. */
const REFERENCE_TEMP_F = 100;

/** Compute SUS at `tempF` °F from kinematic viscosity `nu` in mm²/s (ASTM D2161 equation). */
export function computeSayboltSeconds(nu: number, tempF = REFERENCE_TEMP_F): number {
  // ASTM D2161: SUS(100 °F) = 4.6324 ν + (1 + 0.03264 ν) / ((3930.2 + 262.7 ν + 23.97 ν² + 1.646 ν³) · 1e−5)
  const denominator = (3930.2 + 262.7 * nu + 23.97 * nu * nu + 1.646 * nu * nu * nu) * 1e-5;
  const sus100 = 4.6324 * nu + (1 + 0.03264 * nu) / denominator;
  // ASTM D2161: at another temperature t (°F) multiply by 1 + 0.000061 (t − 100).
  return sus100 * (1 + 0.000061 * (tempF - REFERENCE_TEMP_F));
}

/**
 * Convert SUS measured at `tempF` °F to kinematic viscosity in mm²/s by inverting the D2161 equation.
 * Returns null when `sus` is not a finite number at or above the lowest tabulated SUS.
 */
export function convertSayboltToKinematic(sus: number, tempF: number): number | null {
  if (!Number.isFinite(sus) || !Number.isFinite(tempF)) return null;
  const factor = 1 + 0.000061 * (tempF - REFERENCE_TEMP_F);
  if (factor <= 0) return null;
  const sus100 = sus / factor;
  if (sus100 < MIN_CONVERTIBLE_SUS) return null;
  // The forward equation rises monotonically in ν and is never below 4.6324 ν (its second term is
  // positive), so the root lies in [0, SUS/4.6324]. Bisection: slower than Newton but cannot diverge.
  let low = 0;
  let high = sus100 / 4.6324;
  for (let i = 0; i < 200 && high - low > 1e-12 * Math.max(1, high); i += 1) {
    const mid = (low + high) / 2;
    if (computeSayboltSeconds(mid, REFERENCE_TEMP_F) < sus100) low = mid;
    else high = mid;
  }
  return (low + high) / 2;
}

/**
 * The convention the import assumes for a Saybolt column, in words for the preview. Labs state SUS either
 * measured at 210 °F or worked out from a KV100 by the D2161 equation at 210 °F; both come to the same
 * number, so the import reads the figure as "SUS at 210 °F" and inverts D2161 at 210 °F — never at the
 * equation's 100 °F reference, which would give a KV100 about 0.7 % off.
 */
export function describeSayboltConvention(
  columns: readonly { code?: string | undefined; conversion?: string | undefined }[],
): string | null {
  const converted = columns.some((c) => c.conversion === 'SUS210→KV100');
  const kept = columns.some((c) => c.code === 'SUS210');
  if (converted) {
    return 'Saybolt seconds are taken as SUS at 210 °F and turned into the viscosity at 100 °C by inverting the ASTM D2161 equation at 210 °F; the seconds are also kept as the lab reported them.';
  }
  if (kept) {
    return 'This file gives the viscosity at 100 °C directly, so that column is used; the Saybolt seconds (taken as SUS at 210 °F) are kept as reported and not converted.';
  }
  return null;
}
