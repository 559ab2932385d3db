import type { WearForecast } from '../analysis/wear-forecast';
import type { MeterUnit } from '../units/units';

const n = (v: number, meter: MeterUnit) => `${Math.round(v).toLocaleString('en-US')} ${meter}`;

/** One or two sentences a rider understands for a forecast, with odometers in the machine's unit. */
export function describeForecast(f: WearForecast, meter: MeterUnit): { headline: string; detail: string } {
  switch (f.status) {
    case 'no-readings':
      return { headline: 'No measurements yet', detail: 'Measure the part at the next service to start a forecast.' };
    case 'past-limit':
      return { headline: 'At or past the service limit', detail: `The reading at ${n(f.odometer, meter)} is at or beyond the limit. Check it against the service manual before riding on.` };
    case 'no-wear-trend':
      return { headline: 'No wear measured yet', detail: 'The readings are not below the middle of the new range, so there is no trend to extend.' };
    case 'forecast': {
      const range = f.high === null ? `from about ${n(f.low, meter)} on — too few readings to say how late` : `somewhere between ${n(f.low, meter)} and ${n(f.high, meter)}`;
      const how = f.method === 'resolution-corners'
        ? 'With one reading the range comes from where in the new range the part started and the measuring tool’s resolution.'
        : `From ${f.readings} readings; the range is a 95 % prediction interval of the fitted line.`;
      return {
        headline: `Service limit near ${n(f.limitAt, meter)}`,
        detail: `Likely ${range} (${f.sureness} range). ${how}`,
      };
    }
  }
}
