/**
 * The one way Sumpwise writes dates and times on screens: "2 Dec 2026" for a calendar day and
 * "2 Dec 2026, 14:05" for a moment, in the reader's time zone. Day-month-year with the month as a word cannot be
 * misread the way 02/12 or 12/02 can. Month words are our own list, not the runtime's locale data, so a server
 * and a browser with different ICU versions write the same text ("Sept" versus "Sep"). Pure.
 */

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'] as const;

/** The zone used when a user has not chosen one (and for signed-out pages). */
export const DEFAULT_TIME_ZONE = 'UTC';

const formatters = new Map<string, Intl.DateTimeFormat>();

function partsFormatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: '2-digit',
      minute: '2-digit',
      hourCycle: 'h23',
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/** True when `name` is an IANA zone name the runtime knows (including "UTC"); the canonical spelling is kept. */
export function isTimeZone(name: unknown): name is string {
  if (typeof name !== 'string' || name.length === 0 || name.length > 64 || !/^[A-Za-z0-9_+\-/]+$/.test(name)) {
    return false;
  }
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: name });
    return true;
  } catch {
    return false;
  }
}

/**
 * The zone names a user may choose from: UTC first, then the runtime's IANA list, plus `current` when the list
 * spells it otherwise (ICU lists some zones under their older names, "Asia/Calcutta" for "Asia/Kolkata", while a
 * browser may report the newer one).
 */
export function timeZoneChoices(current?: string | null): string[] {
  const names = Intl.supportedValuesOf('timeZone').filter((n) => n !== DEFAULT_TIME_ZONE);
  const extra = current && current !== DEFAULT_TIME_ZONE && !names.includes(current) && isTimeZone(current);
  return [DEFAULT_TIME_ZONE, ...(extra ? [current] : []), ...names];
}

/** A calendar day ("2026-12-02", a DATE without time) as "2 Dec 2026"; never shifted by a zone. */
export function formatDay(isoDay: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})/.exec(isoDay);
  if (!m) return isoDay;
  const month = MONTHS[Number(m[2]) - 1];
  if (!month) return isoDay;
  return `${Number(m[3])} ${month} ${m[1]}`;
}

/** A moment as "2 Dec 2026, 14:05" in `timeZone` (UTC when the zone is missing or unknown). */
export function formatMoment(at: Date, timeZone: string | null | undefined): string {
  if (Number.isNaN(at.getTime())) return '';
  const zone = timeZone && isTimeZone(timeZone) ? timeZone : DEFAULT_TIME_ZONE;
  const parts: Record<string, string> = {};
  for (const p of partsFormatter(zone).formatToParts(at)) parts[p.type] = p.value;
  const month = MONTHS[Number(parts.month) - 1] ?? '';
  return `${Number(parts.day)} ${month} ${parts.year}, ${parts.hour}:${parts.minute}`;
}

/** The calendar day a moment falls on in `timeZone`, as "2 Dec 2026". */
export function formatMomentDay(at: Date, timeZone: string | null | undefined): string {
  return formatMoment(at, timeZone).split(',')[0] ?? '';
}

/** The zone this runtime reports (a browser's is the device's), or UTC when it reports none. */
export function runtimeTimeZone(): string {
  try {
    return Intl.DateTimeFormat().resolvedOptions().timeZone || DEFAULT_TIME_ZONE;
  } catch {
    return DEFAULT_TIME_ZONE;
  }
}
