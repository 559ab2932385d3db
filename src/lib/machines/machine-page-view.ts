/**
 * What a machine's page shows: its specification line, samples, manual grades, oil now, oil changes and wear
 * parts, in words and in the rider's units. Pure: no database, no Astro.
 */
import type { WearForecast } from '../analysis/wear-forecast';
import type { OilChange } from '../oil-changes/oil-changes';
import { STATE_LABELS, type Sample } from '../samples/samples';
import {
  formatLength,
  formatMeter,
  formatTemperature,
  fromStoredMeter,
  type LengthUnit,
  type TemperatureUnit,
} from '../units/units';
import { describeForecast, formatWholeMeter } from '../wear-parts/forecast-words';
import type { WearMeasurement, WearPart } from '../wear-parts/wear-parts';
import { COOLING_LABELS, LAYOUT_LABELS, type Machine, type Meter } from './machines';
import type { IntervalCallKind, Level } from '../levels';
import { formatDay } from '../words/dates';
import { describeCallWithDistance, describeVerdictReason, type Verdict } from '../verdicts/verdicts';

/** Recent oil changes are shown as cards; older ones fold into a table. */
export const RECENT_CHANGES = 4;

export interface MachinePageInput {
  machine: Machine;
  samples: readonly Sample[];
  oilChanges: readonly (OilChange & { photos: readonly { id: string; caption: string }[] })[];
  wearParts: readonly { part: WearPart; measurements: readonly WearMeasurement[]; forecast: WearForecast }[];
  temperatureUnit: TemperatureUnit;
  lengthUnit: LengthUnit;
  /** The verdict of each sample with results, by sample id. */
  verdicts?: ReadonlyMap<string, Verdict>;
  /** ?added or ?logged after a form. */
  added: boolean;
  logged: boolean;
}

export interface OilChangeCard {
  /** ISO days here and below stay machine-readable: the page writes them for people (components/ui/Day.astro). */
  changedOn: string;
  odometer: string;
  /** "+1,200 km since the previous change" (as the figure) or the words for a first or meter-swap change. */
  sincePrevious: string | null;
  sinceWords: string;
  oil: string;
  otherWork: string[];
  photos: { href: string; alt: string }[];
}

export interface MachinePageView {
  flash: string;
  spec: string;
  samples: {
    href: string;
    bottleCode: string;
    drawnOn: string;
    odometer: string;
    onOil: string;
    state: string;
    level: Level | null;
    call: IntervalCallKind | null;
  }[];
  /** At watch or act: the decision first, above everything else on the page. */
  banner: VerdictBanner | null;
  /** The page's one filled button, by state: review a flagged sample, log the first oil change, or the drain card. */
  primary: 'review' | 'oil-change' | 'drain-card';
  grades: { grade: string; temperatures: string }[];
  longestInterval: string;
  oilNow: { grade: string; product: string; since: string; odometer: string } | null;
  recentChanges: OilChangeCard[];
  olderChanges: { changedOn: string; odometer: string; sincePrevious: string; oil: string }[];
  wearParts: { href: string; name: string; limit: string; headline: string }[];
}

/** The temperatures a manual grade is for: "up to 30 °C", "from 10 °C", "−10 °C to 40 °C". */
export function describeGradeTemperatures(minC: number, maxC: number, unit: TemperatureUnit): string {
  // The machine form's open ends: −40 °C and below means "any cold", 55 °C and above "any heat".
  if (minC <= -40) return `up to ${formatTemperature(maxC, unit)}`;
  if (maxC >= 55) return `from ${formatTemperature(minC, unit)}`;
  return `${formatTemperature(minC, unit)} to ${formatTemperature(maxC, unit)}`;
}

/** "2019 · 449 cc · Single · Liquid-cooled · shared engine/gearbox/clutch oil · 1.2 L", leaving out what is unknown. */
export function describeMachineSpec(m: Machine): string {
  return [
    m.modelYear,
    m.displacementCc && `${m.displacementCc} cc`,
    `${LAYOUT_LABELS[m.engineLayout]}`,
    `${COOLING_LABELS[m.cooling]}-cooled`,
    m.sharedOil ? 'shared engine/gearbox/clutch oil' : 'separate gearbox oil',
    m.oilCapacityL && `${m.oilCapacityL} L`,
  ]
    .filter(Boolean)
    .join(' · ');
}

function flashOf(input: MachinePageInput): string {
  if (input.added) return 'Machine added. Log its last oil change next.';
  return input.logged ? 'Oil change logged.' : '';
}

/** The verdict banner of a machine page: level, reason, call with its distance, and the sample to review. */
export interface VerdictBanner {
  level: Level;
  reason: string;
  call: IntervalCallKind | null;
  callText: string;
  href: string;
  action: string;
}

/**
 * The banner for the machine's latest sample with results (samples newest first), when it is at watch or act;
 * null when steady or without results.
 */
export function buildVerdictBanner(
  samples: readonly Pick<Sample, 'id' | 'state'>[],
  verdicts: ReadonlyMap<string, Verdict> | undefined,
  meter: Meter,
): VerdictBanner | null {
  const latest = samples.find((s) => s.state === 'results_in' || s.state === 'reviewed');
  const v = latest && verdicts?.get(latest.id);
  if (!latest || !v || v.level === 'steady') return null;
  return {
    level: v.level,
    reason: describeVerdictReason(v),
    call: v.call,
    callText: v.call ? describeCallWithDistance(v.call, v.nextInterval, meter) : 'No interval call yet',
    href: `/samples/${latest.id}#review`,
    action: latest.state === 'results_in' ? 'Review sample' : 'Open sample',
  };
}

/** The machine page's model. */
export function buildMachinePageView(input: MachinePageInput): MachinePageView {
  const m = input.machine;
  const meter = (v: number) => formatMeter(v, m.meter);
  const latest = input.oilChanges[0];
  const banner = buildVerdictBanner(input.samples, input.verdicts, m.meter);
  return {
    flash: flashOf(input),
    spec: describeMachineSpec(m),
    samples: input.samples.map((s) => ({
      href: `/samples/${s.id}`,
      bottleCode: s.bottleCode,
      drawnOn: s.drawnOn,
      odometer: meter(s.odometer),
      onOil: s.distanceOnOil !== null ? meter(s.distanceOnOil) : '—',
      state: STATE_LABELS[s.state],
      level: input.verdicts?.get(s.id)?.level ?? null,
      call: input.verdicts?.get(s.id)?.call ?? null,
    })),
    banner,
    primary:
      banner?.action === 'Review sample' ? 'review' : input.oilChanges.length === 0 ? 'oil-change' : 'drain-card',
    grades: m.recommendedGrades.map((g) => ({
      grade: g.grade,
      temperatures: describeGradeTemperatures(g.minC, g.maxC, input.temperatureUnit),
    })),
    longestInterval: `${m.maxIntervalStored !== null ? meter(m.maxIntervalStored) : '—'}${m.maxIntervalDays ? ` or ${m.maxIntervalDays} days` : ''}`,
    oilNow: latest
      ? {
          grade: latest.saeGrade,
          product: latest.oilProduct ? `· ${latest.oilProduct}` : '',
          since: latest.changedOn,
          odometer: meter(latest.odometer),
        }
      : null,
    recentChanges: input.oilChanges.slice(0, RECENT_CHANGES).map((c) => ({
      changedOn: c.changedOn,
      odometer: meter(c.odometer),
      sincePrevious: c.distanceSincePrevious !== null ? meter(c.distanceSincePrevious) : null,
      sinceWords: c.meterReplaced ? 'meter replaced' : 'first logged change',
      oil: `${c.saeGrade}${c.oilProduct ? ` · ${c.oilProduct}` : ''}${c.volumeL ? ` · ${c.volumeL} L` : ''} · filter ${c.filterChanged ? 'changed' : 'kept'}${c.topUpL > 0 ? ` · ${c.topUpL} L topped up before` : ''}`,
      otherWork: c.otherWork,
      photos: c.photos.map((p) => ({
        href: `/api/photos/${p.id}`,
        alt: p.caption || `Photo from the oil change on ${formatDay(c.changedOn)}`,
      })),
    })),
    olderChanges: input.oilChanges.slice(RECENT_CHANGES).map((c) => ({
      changedOn: c.changedOn,
      odometer: meter(c.odometer),
      sincePrevious: c.distanceSincePrevious !== null ? meter(c.distanceSincePrevious) : '—',
      oil: `${c.saeGrade}${c.oilProduct ? ` · ${c.oilProduct}` : ''}${c.otherWork.length > 0 ? ` · ${c.otherWork.join('; ')}` : ''}${c.photos.length > 0 ? ` · ${c.photos.length} photo(s)` : ''}`,
    })),
    wearParts: input.wearParts.map((d) => {
      const last = d.measurements.at(-1);
      const lastWords = last
        ? ` · last ${formatLength(last.summaryMm, input.lengthUnit)} at ${formatWholeMeter(fromStoredMeter(last.odometer, m.meter), m.meter)}`
        : '';
      return {
        href: `/machines/${m.id}/wear-parts/${d.part.id}`,
        name: d.part.name,
        limit: `Limit ${formatLength(d.part.serviceLimitMm, input.lengthUnit)}${lastWords}`,
        headline: describeForecast(d.forecast, m.meter, d.part).headline,
      };
    }),
  };
}
