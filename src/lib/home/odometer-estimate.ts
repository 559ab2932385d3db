/**
 * Where a machine's odometer probably is today, from its recent oil changes and samples (odometer against
 * date), and whether its next sample is due. Pure: no database, no clock (today is passed in).
 */

export interface OdometerPoint {
  /** YYYY-MM-DD */
  date: string;
  /** Stored unit (km, or hours for an hour meter). */
  odometer: number;
}

export interface OdometerEstimate {
  odometer: number;
  /** Distance per day from the recent history, never negative. */
  pacePerDay: number;
  /** 'pace': extrapolated from recent riding; 'last-known': no pace to go on. */
  basis: 'pace' | 'last-known';
  lastDate: string;
  lastOdometer: number;
}

const DAY_MS = 86_400_000;

function dayNumber(date: string): number {
  return Math.floor(Date.parse(`${date.slice(0, 10)}T00:00:00Z`) / DAY_MS);
}

/**
 * Estimated odometer on `today`: the last known reading plus the recent pace (least-squares slope of odometer
 * against day over the last `lookbackDays` before the last reading, at least two readings on two days) times
 * the days since. The pace is never negative (a meter does not run back) and the estimate never below the
 * last reading.
 */
export function estimateCurrentOdometer(
  points: readonly OdometerPoint[],
  today: string,
  options: { lookbackDays?: number } = {},
): OdometerEstimate | null {
  const lookback = options.lookbackDays ?? 365;
  const valid = points
    .filter((p) => Number.isFinite(p.odometer) && Number.isFinite(dayNumber(p.date)))
    .sort((a, b) => dayNumber(a.date) - dayNumber(b.date) || a.odometer - b.odometer);
  if (valid.length === 0) return null;
  const last = valid.at(-1)!;
  const lastDay = dayNumber(last.date);
  let recent = valid.filter((p) => lastDay - dayNumber(p.date) <= lookback);
  if (recent.length < 2) recent = valid.slice(-2);
  let pace = 0;
  const days = recent.map((p) => dayNumber(p.date));
  if (recent.length >= 2 && Math.max(...days) > Math.min(...days)) {
    const meanX = days.reduce((s, d) => s + d, 0) / days.length;
    const meanY = recent.reduce((s, p) => s + p.odometer, 0) / recent.length;
    let sxy = 0;
    let sxx = 0;
    recent.forEach((p, i) => {
      sxy += (days[i]! - meanX) * (p.odometer - meanY);
      sxx += (days[i]! - meanX) ** 2;
    });
    pace = Math.max(0, sxy / sxx);
  }
  const since = Math.max(0, dayNumber(today) - lastDay);
  return {
    odometer: last.odometer + pace * since,
    pacePerDay: pace,
    basis: pace > 0 ? 'pace' : 'last-known',
    lastDate: last.date.slice(0, 10),
    lastOdometer: last.odometer,
  };
}

export interface DueInput {
  today: string;
  /** From the latest interval call, stored units. */
  nextSampleOn?: string | null;
  nextSampleOdometer?: number | null;
  estimate: OdometerEstimate | null;
}

export interface DueStatus {
  due: boolean;
  /** Why: the date passed, the estimated odometer passed, or both. */
  reasons: ('date' | 'odometer')[];
  /** Distance still to go by the estimate (negative when past), when an odometer target exists. */
  remaining: number | null;
  /** Days to go (negative when past), when a date target exists. */
  daysLeft: number | null;
}

/** Whether the next sample is due by date, or by the odometer estimated from recent riding. */
export function findSampleDue(input: DueInput): DueStatus {
  const reasons: ('date' | 'odometer')[] = [];
  let daysLeft: number | null = null;
  let remaining: number | null = null;
  if (input.nextSampleOn) {
    daysLeft = dayNumber(input.nextSampleOn) - dayNumber(input.today);
    if (daysLeft <= 0) reasons.push('date');
  }
  if (input.nextSampleOdometer !== null && input.nextSampleOdometer !== undefined && input.estimate) {
    remaining = input.nextSampleOdometer - input.estimate.odometer;
    if (remaining <= 0) reasons.push('odometer');
  }
  return { due: reasons.length > 0, reasons, remaining, daysLeft };
}

/** Days between two YYYY-MM-DD dates (b − a). */
export function countDaysBetween(a: string, b: string): number {
  return dayNumber(b) - dayNumber(a);
}

/**
 * How old the last reading may be for its pace to count as recent riding: a season (common practice, no published
 * source). Past it, a bike laid up for winter would be offered a reading it never reached.
 */
export const PREFILL_MAX_STALE_DAYS = 90;

/**
 * The reading a drain card may offer before the rider looks at the meter: the estimate from recent riding, rounded
 * to a whole unit, and only when it is past the latest oil change. The reading of an old oil change is never
 * offered: a drain registered at or below it would be attached to the fill before (or refused), so without a recent
 * pace to go on the field stays empty and the rider types what the meter says.
 */
export function drainCardOdometerPrefill(
  estimate: OdometerEstimate | null,
  latestChangeOdometer: number | null,
  today: string,
): number | null {
  if (!estimate || estimate.basis !== 'pace') return null;
  if (countDaysBetween(estimate.lastDate, today) > PREFILL_MAX_STALE_DAYS) return null;
  const rounded = Math.round(estimate.odometer);
  if (latestChangeOdometer !== null && rounded <= latestChangeOdometer) return null;
  return rounded;
}
