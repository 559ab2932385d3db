import type { WearForecast, WearReversal } from '../analysis/wear-forecast';
import type { Level } from '../levels';
import type { MeterUnit } from '../units/units';

/** A meter reading (already in the meter's unit) as whole units with separators: "12,400 km". */
export function formatWholeMeter(v: number, meter: MeterUnit): string {
  return `${Math.round(v).toLocaleString('en-US')} ${meter}`;
}
const n = formatWholeMeter;

/** What the words need to know of the part. */
export interface ForecastPart {
  name: string;
  /** 'min': wears thinner towards the limit; 'max': grows towards it (a chain stretching). */
  limitDirection: 'min' | 'max';
}

/** The level a forecast deserves on screen: word + shape go with it, as everywhere else. */
export type ForecastTone = Level;

/**
 * A brake part, recognised by its name (brake pads, brake shoes, a brake disc or rotor, a caliper):
 * past its limit it gets a firm "do not ride" rather than "check the manual".
 */
export function isBrakePart(name: string): boolean {
  return /brake|\bpads?\b|\brotors?\b|caliper/i.test(name);
}

function describeReversals(
  reversals: readonly WearReversal[],
  part: ForecastPart,
  meter: MeterUnit,
  fmt: (v: number) => string,
): string {
  if (reversals.length === 0) return '';
  const r = reversals[reversals.length - 1]!;
  const moved = part.limitDirection === 'min' ? 'thicker' : 'shorter';
  const more = reversals.length > 1 ? ` (${reversals.length} such steps)` : '';
  return ` The reading at ${n(r.to.odometer, meter)} (${fmt(r.to.value)}) is ${moved} than the one at ${n(r.from.odometer, meter)} (${fmt(r.from.value)}) by more than the tool reads${more}: either the part was replaced — then add it as a new part from the odometer it was fitted — or one reading slipped; measure again.`;
}

/**
 * One or two sentences a rider understands for a forecast, with odometers in the machine's unit and sizes
 * formatted by `fmt` (in the user's length unit). Works for parts that wear thinner and parts that grow.
 */
export function describeForecast(
  f: WearForecast,
  meter: MeterUnit,
  part: ForecastPart,
  fmt: (v: number) => string = (v) => String(v),
): { headline: string; detail: string; tone: ForecastTone } {
  const grows = part.limitDirection === 'max';
  switch (f.status) {
    case 'no-readings':
      return {
        headline: 'No measurements yet',
        detail: 'Measure the part at the next service to start a forecast.',
        tone: 'steady',
      };
    case 'past-limit': {
      const since = f.firstPastAt < f.odometer ? ` (and already at ${n(f.firstPastAt, meter)})` : '';
      const where = `The reading at ${n(f.odometer, meter)}${since} is ${fmt(f.value)}, ${grows ? 'at or above' : 'at or below'} the service limit.`;
      if (isBrakePart(part.name)) {
        return {
          headline: 'Past the service limit — do not ride until it is replaced',
          detail: `${where} Do not ride until it is replaced. Worn brake parts can fail without warning; follow the service manual, and have brakes fitted or checked by a licensed mechanic if you are not sure how.`,
          tone: 'act',
        };
      }
      return {
        headline: 'Past the service limit',
        detail: `${where} Replace it as the service manual says before riding on; a licensed mechanic can confirm the measurement. If it has been replaced already, add the new part from the odometer it was fitted.`,
        tone: 'act',
      };
    }
    case 'back-from-limit':
      return {
        headline: 'Was the part replaced?',
        detail: `The reading at ${n(f.past.odometer, meter)} (${fmt(f.past.value)}) was at or past the service limit, but the later one at ${n(f.latest.odometer, meter)} (${fmt(f.latest.value)}) is not. If the part was replaced, add the new part from the odometer it was fitted so its readings start afresh; if not, measure again — a part does not ${grows ? 'shrink back' : 'grow back'}. No forecast is drawn from readings of what may be two parts.`,
        tone: 'watch',
      };
    case 'no-measurable-wear':
      return {
        headline: 'No measurable wear yet',
        detail: `${f.readings === 1 ? 'The reading is' : `All ${f.readings} readings are`} still inside the new range, within what the measuring tool reads, so there is no wear to extend to the limit yet. Measure again at a later service.${describeReversals(f.reversals, part, meter, fmt)}`,
        tone: 'steady',
      };
    case 'no-wear-trend':
      return {
        headline: 'No wear trend yet',
        detail: `The readings do not ${grows ? 'grow' : 'get thinner'} over distance, so there is no line to extend to the limit.${describeReversals(f.reversals, part, meter, fmt)}`,
        tone: f.reversals.length > 0 ? 'watch' : 'steady',
      };
    case 'forecast': {
      const range =
        f.high === null
          ? `from about ${n(f.low, meter)} on — too few readings to say how late`
          : `somewhere between ${n(f.low, meter)} and ${n(f.high, meter)}`;
      const how =
        f.method === 'resolution-corners'
          ? `With one reading the range comes from where in the new range the part started and the measuring tool’s resolution; the line starts at ${fmt(f.start.value)}, the expected ${grows ? 'longest' : 'thinnest'} piece when new.`
          : `From ${f.readings} readings and the expected ${grows ? 'longest' : 'thinnest'} new piece (${fmt(f.start.value)}); the range is a 95 % prediction interval of the fitted line.`;
      return {
        headline: `Service limit near ${n(f.limitAt, meter)}`,
        detail: `Likely ${range} (${f.sureness} range). ${how}${describeReversals(f.reversals, part, meter, fmt)}`,
        tone: f.reversals.length > 0 ? 'watch' : 'steady',
      };
    }
  }
}
