/** makeIntervalCall: shorten, hold or stretch the oil change interval, with the reasons and the next sample due. */
import { analyseSample, type SampleAnalysis } from './analyse-sample';
import { BASELINE_JUMP, INTERVAL_CALL } from './rule-definitions';
import type { AnalyseInput, Level } from './types';

export type Call = 'shorten' | 'hold' | 'stretch';

export interface IntervalCall {
  call: Call;
  /** Suggested distance (or hours) for the next oil change interval; never beyond the manufacturer's longest. */
  nextIntervalDistance: number;
  /** When the next sample is due: machine odometer (or hour meter), and a date when one can be estimated. */
  nextSampleDue: { distance: number; date?: string };
  reasons: string[];
  /** The figures the call was made from, so the interface can show how it was made. */
  basis: {
    worst: SampleAnalysis['worst'];
    currentInterval: number;
    /** The ceiling applied: the manufacturer's longest interval, else the longest this machine has run. */
    ceiling: number;
    ceilingSource: 'manufacturer' | 'machine-history';
    ruleIds: string[];
  };
}

const DAY_MS = 86_400_000;

function roundDownTo(value: number, step: number): number {
  return Math.floor(value / step) * step;
}

function addDays(iso: string, days: number): string | undefined {
  const t = Date.parse(iso);
  if (!Number.isFinite(t) || !Number.isFinite(days)) return undefined;
  return new Date(t + Math.floor(days) * DAY_MS).toISOString().slice(0, 10);
}

/** Distance per day from the oldest dated sample to this one; undefined without enough to go on. */
function estimatePace(input: AnalyseInput): number | undefined {
  const first = input.history.find((s) => Number.isFinite(Date.parse(s.takenAt)));
  if (!first) return undefined;
  const days = (Date.parse(input.sample.takenAt) - Date.parse(first.takenAt)) / DAY_MS;
  const distance = input.sample.odometer - first.odometer;
  if (!(days >= 1) || !(distance > 0)) return undefined;
  return distance / days;
}

/**
 * The interval call for a sample: act means shorten and resample soon; a climbing trend shortens; other watch
 * findings hold; a steady run on a ready baseline stretches. Never beyond the manufacturer's longest interval.
 */
export function makeIntervalCall(
  input: AnalyseInput & {
    /** This sample's analysis when the caller already has it (else it is computed). */
    analysis?: SampleAnalysis | undefined;
    /** Worst level of each previous sample, aligned with the end of `history` (else they are recomputed). */
    previousWorst?: readonly Level[] | undefined;
  },
): IntervalCall {
  const p = INTERVAL_CALL.params;
  const { machine, sample, history } = input;
  const analysis = input.analysis ?? analyseSample(input);
  const step = p.roundTo[machine.distanceUnit];

  const ranIntervals = history.map((s) => s.distanceOnOil).filter((d) => Number.isFinite(d) && d > 0);
  let currentInterval = Number.isFinite(sample.distanceOnOil) && sample.distanceOnOil > 0 ? sample.distanceOnOil : NaN;
  if (!Number.isFinite(currentInterval)) currentInterval = ranIntervals.at(-1) ?? machine.maxIntervalDistance ?? NaN;
  if (!Number.isFinite(currentInterval)) {
    throw new RangeError('An interval call needs the distance on oil of this sample, an earlier one, or the manufacturer interval.');
  }

  const manufacturer = machine.maxIntervalDistance !== undefined && machine.maxIntervalDistance > 0 ? machine.maxIntervalDistance : undefined;
  const ceiling = manufacturer ?? Math.max(currentInterval, ...ranIntervals);
  const ceilingSource = manufacturer !== undefined ? 'manufacturer' : 'machine-history';

  const reasons: string[] = [];
  const ruleIds = [...new Set(analysis.findings.map((f) => f.ruleId))];
  const clamp = (d: number) => Math.min(ceiling, Math.max(Math.min(step, ceiling), roundDownTo(d, step)));

  let call: Call;
  let next: number;
  let dueAfter: number;
  let dueDays: number | undefined;

  const actFindings = analysis.findings.filter((f) => f.level === 'act');
  const climbing = analysis.findings.filter((f) => f.level === 'watch' && f.ruleId === 'climbing-trend');
  if (actFindings.length > 0) {
    call = 'shorten';
    next = clamp(currentInterval * p.actFactor);
    dueAfter = clamp(currentInterval * p.resampleFraction);
    dueDays = p.resampleDays;
    reasons.push(
      `${actFindings.length} act finding${actFindings.length > 1 ? 's' : ''}: shorten the interval to about ${Math.round(p.actFactor * 100)} % and take another sample soon to see whether it repeats.`,
    );
    for (const f of actFindings) reasons.push(f.sentence);
  } else if (climbing.length > 0) {
    call = 'shorten';
    next = clamp(currentInterval * p.climbingFactor);
    dueAfter = next;
    reasons.push(`A climbing trend: shorten the interval to about ${Math.round(p.climbingFactor * 100)} % to watch it more closely.`);
    for (const f of climbing) reasons.push(f.sentence);
  } else if (analysis.worst === 'watch') {
    call = 'hold';
    next = clamp(currentInterval);
    dueAfter = next;
    reasons.push('Watch findings but nothing climbing or at an act level: hold the interval and see what the next sample says.');
  } else {
    // Stretch only on a ready baseline with the previous samples steady as well.
    const needSteady = p.stretchSteadySamples - 1;
    const ready = history.length >= BASELINE_JUMP.params.minSamples;
    let previousSteady = ready && history.length >= needSteady;
    for (let i = 0; previousSteady && i < needSteady; i++) {
      const idx = history.length - 1 - i;
      const known = input.previousWorst?.[input.previousWorst.length - 1 - i];
      const worst =
        known ?? analyseSample({ machine, limits: input.limits, history: history.slice(0, idx), sample: history[idx]! }).worst;
      if (worst !== 'steady') previousSteady = false;
    }
    const stretched = clamp(currentInterval * p.stretchFactor);
    if (!ready) {
      call = 'hold';
      next = clamp(currentInterval);
      reasons.push('All steady, but the baseline is still building: hold the interval until at least three samples are on file.');
    } else if (!previousSteady) {
      call = 'hold';
      next = clamp(currentInterval);
      reasons.push(`All steady this time; a stretch waits for ${p.stretchSteadySamples} steady samples in a row.`);
    } else if (stretched > currentInterval) {
      call = 'stretch';
      next = stretched;
      reasons.push(
        `${p.stretchSteadySamples} steady samples in a row on a ready baseline: the interval can stretch by about ${Math.round((p.stretchFactor - 1) * 100)} %.`,
      );
    } else {
      call = 'hold';
      next = clamp(currentInterval);
      reasons.push(
        ceilingSource === 'manufacturer'
          ? "All steady, and the interval is already at the manufacturer's longest: hold."
          : "All steady, but with no manufacturer's longest interval on file the call never goes beyond the longest interval this machine has run: hold.",
      );
    }
    dueAfter = next;
  }

  // Only running past the ceiling turns a hold into a shorten; rounding the next interval down does not.
  if (currentInterval > ceiling && call === 'hold') {
    call = 'shorten';
    reasons.push(
      `This oil ran ${Math.round(currentInterval)} ${machine.distanceUnit}, beyond the longest allowed ${Math.round(ceiling)} ${machine.distanceUnit}: bring the interval back within it.`,
    );
  }

  const pace = estimatePace(input);
  const days = [pace ? dueAfter / pace : Infinity, machine.maxIntervalDays ?? Infinity, dueDays ?? Infinity];
  const dueInDays = Math.min(...days);
  const date = Number.isFinite(dueInDays) ? addDays(sample.takenAt, dueInDays) : undefined;
  if (machine.maxIntervalDays !== undefined && pace !== undefined && dueAfter / pace > machine.maxIntervalDays) {
    reasons.push(`At this machine's pace the calendar limit of ${machine.maxIntervalDays} days comes first.`);
  }

  return {
    call,
    nextIntervalDistance: next,
    nextSampleDue: date ? { distance: sample.odometer + dueAfter, date } : { distance: sample.odometer + dueAfter },
    reasons,
    basis: { worst: analysis.worst, currentInterval, ceiling, ceilingSource, ruleIds },
  };
}
