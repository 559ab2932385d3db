/**
 * Unit conversion at the edges. Sumpwise stores one canonical unit per quantity (km — or engine hours for
 * an hour meter —, mm, °C, litres) and converts only when reading a form or drawing a screen.
 *
 * Factors are exact by definition (NIST SP 811, 2008 edition, Appendix B.8 and B.9):
 * 1 in = 25.4 mm, 1 mi (international) = 1609.344 m, t/°C = (t/°F − 32)/1.8.
 */
import type { Meter } from '../machines/machines';

/** Millimetres in one inch (exact, NIST SP 811 B.8). */
export const MM_PER_IN = 25.4;
/** Kilometres in one international mile (exact, NIST SP 811 B.8). */
export const KM_PER_MI = 1.609344;

export type DistanceUnit = 'mi' | 'km';
/** A machine's meter (the machines module's word, named here by what the conversions take). */
export type MeterUnit = Meter;
export type LengthUnit = 'in' | 'mm';
export type TemperatureUnit = 'F' | 'C';

/** A reading in the machine's own meter unit, in the stored unit (km; hours stay hours). */
export function toStoredMeter(value: number, meter: MeterUnit): number {
  return meter === 'mi' ? value * KM_PER_MI : value;
}

/** A stored meter value (km or hours) in the machine's own meter unit. */
export function fromStoredMeter(stored: number, meter: MeterUnit): number {
  return meter === 'mi' ? stored / KM_PER_MI : stored;
}

/** A stored distance (km) in a user's chosen distance unit. */
export function convertKmTo(km: number, unit: DistanceUnit): number {
  return unit === 'mi' ? km / KM_PER_MI : km;
}

/** A length in the given unit, in millimetres. */
export function toMillimetres(value: number, unit: LengthUnit): number {
  return unit === 'in' ? value * MM_PER_IN : value;
}

/** A length in millimetres, in the given unit. */
export function fromMillimetres(mm: number, unit: LengthUnit): number {
  return unit === 'in' ? mm / MM_PER_IN : mm;
}

/** A temperature in the given unit, in °C. */
export function toCelsius(value: number, unit: TemperatureUnit): number {
  return unit === 'F' ? (value - 32) / 1.8 : value;
}

/** A temperature in °C, in the given unit. */
export function fromCelsius(c: number, unit: TemperatureUnit): number {
  return unit === 'F' ? c * 1.8 + 32 : c;
}

/** The short label of a meter unit, for headings and inputs. */
export function labelMeter(meter: MeterUnit): string {
  return meter === 'h' ? 'h' : meter;
}

/** Rounds for display without trailing float noise (e.g. 0.1 + 0.2). */
export function roundTo(value: number, decimals: number): number {
  const f = 10 ** decimals;
  return Math.round((value + Number.EPSILON * Math.sign(value)) * f) / f;
}

/**
 * The two number formats of meter readings, made once: `toLocaleString` with options builds a new Intl.NumberFormat
 * on every call (about 18 µs against 0.4 µs here), and a machine page formats a reading per sample.
 */
const WHOLE = new Intl.NumberFormat('en-US', { maximumFractionDigits: 0, minimumFractionDigits: 0 });
const TENTHS = new Intl.NumberFormat('en-US', { maximumFractionDigits: 1, minimumFractionDigits: 0 });

/** A meter reading for screens: whole miles/km with thousands separators, hours to one decimal. */
export function formatMeter(stored: number, meter: MeterUnit): string {
  const v = fromStoredMeter(stored, meter);
  return `${(meter === 'h' ? TENTHS : WHOLE).format(v)} ${labelMeter(meter)}`;
}

/** A length in mm for screens in the user's unit: inches to 3 decimals, mm to 2. */
export function formatLength(mm: number, unit: LengthUnit): string {
  const v = fromMillimetres(mm, unit);
  return `${v.toFixed(unit === 'in' ? 3 : 2)} ${unit}`;
}

/** A temperature in °C for screens in the user's unit, whole degrees. */
export function formatTemperature(c: number, unit: TemperatureUnit): string {
  return `${Math.round(fromCelsius(c, unit))} °${unit}`;
}

/** The input step that suits a length unit (a micrometer reads 0.001 in or 0.01 mm). */
export function lengthStep(unit: LengthUnit): string {
  return unit === 'in' ? '0.0001' : '0.001';
}
