/**
 * The interval call (shorten, hold, stretch or fix-first) and the replay that judges a machine's samples in
 * order, exactly as production judges each sample when its results arrive.
 */
import { HISTORY_TAIL, analyseSample, type SampleAnalysis } from './analyse-sample';
import type { MeasurandCode } from './measurands';
import { INTERVAL_CALL } from './rule-definitions';
import { formatFigure } from './figures';
import { readFiringValue, findOwnLevel } from './rules';
import { CALL_KINDS, type IntervalCallKind } from '../levels';
import type { AnalyseInput, FixedLimits, Level, MachineProfile, SamplePoint } from './types';

/** The call words (defined once in the levels module), in the order screens list them. */
export type Call = IntervalCallKind;
export const CALLS: readonly Call[] = CALL_KINDS;

export interface IntervalCall {
  call: Call;
  /** Suggested distance (or hours) for the next oil change interval; null when no interval is known yet. */
  nextIntervalDistance: number | null;
  /** When the next sample is due: machine odometer (or hour meter), and a date when one can be estimated. */
  nextSampleDue: { distance: number | null; date?: string };
  reasons: string[];
  /** The figures the call was made from, so the interface can show how it was made. */
  basis: {
    worst: Level;
    /** The machine's regular interval: the median of its recent completed oil changes. */
    regularInterval: number | null;
    regularSource: 'completed-oil-changes' | 'longest-run' | 'manufacturer' | 'unknown';
    /** The ceiling applied: the manufacturer's longest interval, else the longest this machine has run. */
    ceiling: number | null;
    ceilingSource: 'manufacturer' | 'machine-history';
    ruleIds: string[];
    /** True when this sample could count towards a stretch (steady, ready bands, oil condition reported). */
    stretchReady: boolean;
  };
}

/** What the call of a later sample needs to know about an earlier one. */
export interface PreviousJudgement {
  sampleId: string;
  call: Call;
  worst: Level;
  stretchReady: boolean;
  nextIntervalDistance: number | null;
  distanceOnOil: number;
}

const DAY_MS = 86_400_000;
/**
 * Rules whose cause is not the oil (fix the cause, resample, interval unchanged), with the readings that cause
 * explains: coolant brings its markers and water; dust brings silicon and the abrasive wear of aluminium and iron.
 */
const CAUSE_RULES = new Map<string, readonly MeasurandCode[]>([
  ['coolant-markers', ['Na', 'K', 'B', 'GLYCOL', 'WATER']],
  ['dirt', ['Si', 'Al', 'Fe']],
]);

function roundDownTo(value: number, step: number): number {
  return Math.floor(value / step) * step;
}

function addDays(iso: string, days: number): string | undefined {
  const t = Date.parse(iso);
  if (!Number.isFinite(t) || !Number.isFinite(days)) return undefined;
  return new Date(t + Math.ceil(days) * DAY_MS).toISOString().slice(0, 10);
}

function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  return s.length % 2 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}

function oilStart(s: SamplePoint): number {
  return s.odometer - s.distanceOnOil;
}

/**
 * The machine's regular interval at this sample: the median of its last few completed oil changes (from one oil
 * change to the next, as the samples' odometers and distances on oil show them), never this sample's oil age.
 */
export function findRegularInterval(
  machine: MachineProfile,
  history: readonly SamplePoint[],
  sample: SamplePoint,
): { value: number | null; source: IntervalCall['basis']['regularSource'] } {
  const all = [...history, sample].filter((s) => Number.isFinite(oilStart(s)) && s.distanceOnOil > 0);
  // Each oil change's start, with the longest distance any sample of that oil showed.
  const oils: { start: number; longest: number }[] = [];
  for (const s of [...all].sort((a, b) => oilStart(a) - oilStart(b))) {
    const last = oils[oils.length - 1];
    if (last && Math.abs(oilStart(s) - last.start) < 1) last.longest = Math.max(last.longest, s.distanceOnOil);
    else oils.push({ start: oilStart(s), longest: s.distanceOnOil });
  }
  const completed: number[] = [];
  for (let i = 0; i + 1 < oils.length; i++) {
    const gap = oils[i + 1]!.start - oils[i]!.start;
    // A gap far longer than the oil was seen to run hides an oil change without a sample.
    completed.push(gap > 1.5 * oils[i]!.longest ? oils[i]!.longest : gap);
  }
  if (completed.length > 0)
    return { value: median(completed.slice(-INTERVAL_CALL.params.regularOf)), source: 'completed-oil-changes' };
  const longest = Math.max(0, ...all.map((s) => s.distanceOnOil));
  if (longest > 0) return { value: longest, source: 'longest-run' };
  if (machine.maxIntervalDistance !== undefined && machine.maxIntervalDistance > 0)
    return { value: machine.maxIntervalDistance, source: 'manufacturer' };
  return { value: null, source: 'unknown' };
}

/** Distance per day from the oldest dated sample to this one; undefined without enough to go on. */
function estimatePace(history: readonly SamplePoint[], sample: SamplePoint): number | undefined {
  const first = history.find((s) => Number.isFinite(Date.parse(s.takenAt)));
  if (!first) return undefined;
  const days = (Date.parse(sample.takenAt) - Date.parse(first.takenAt)) / DAY_MS;
  const distance = sample.odometer - first.odometer;
  if (!(days >= 1) || !(distance > 0)) return undefined;
  return distance / days;
}

/** Why this sample cannot count towards a stretch, or an empty list when it can. */
function findStretchBlocks(sample: SamplePoint, history: readonly SamplePoint[], analysis: SampleAnalysis): string[] {
  const p = INTERVAL_CALL.params;
  const blocks: string[] = [];
  if (analysis.baselineStatus !== 'ready') {
    blocks.push(
      analysis.crewReference
        ? `this machine's own iron and aluminium baselines are still building, and a band ${analysis.crewReference.label} never earns a stretch`
        : 'the iron and aluminium baselines are still building',
    );
  }
  const has = (code: MeasurandCode) => sample.readings[code] !== undefined;
  if (!has('KV100') && !has('KV40')) blocks.push('the lab gave no viscosity');
  if (!has('FUEL') && !has('FLASH')) blocks.push('the lab gave no fuel figure or flash point');
  if (!has('WATER')) blocks.push('the lab gave no water figure');
  const tbn = readFiringValue(sample, 'TBN');
  const tbnNew = tbn !== undefined ? findOwnLevel({ sample, history }, 'TBN', 1) : undefined;
  if (tbn !== undefined && tbnNew && tbn < p.tbnMinFraction * tbnNew.value) {
    blocks.push(
      `TBN is down to ${formatFigure(tbn)} from ${formatFigure(tbnNew.value)}: the oil's reserve is mostly spent`,
    );
  }
  const tan = readFiringValue(sample, 'TAN');
  const tanNew = tan !== undefined ? findOwnLevel({ sample, history }, 'TAN', 1) : undefined;
  if (tan !== undefined && tanNew && tan - tanNew.value >= p.tanMaxRise) {
    blocks.push(`TAN is up to ${formatFigure(tan)} from ${formatFigure(tanNew.value)}: the oil is ageing`);
  }
  return blocks;
}

/**
 * The call for one sample from its analysis and the judgements of the samples before it (oldest first).
 * Pure; judgeHistory and makeIntervalCall feed it.
 */
export function decideIntervalCall(input: {
  machine: MachineProfile;
  history: readonly SamplePoint[];
  sample: SamplePoint;
  analysis: SampleAnalysis;
  previous: readonly PreviousJudgement[];
}): IntervalCall {
  const p = INTERVAL_CALL.params;
  const { machine, sample, history, analysis, previous } = input;
  const step = p.roundTo[machine.distanceUnit];
  const regular = findRegularInterval(machine, history, sample);
  const manufacturer =
    machine.maxIntervalDistance !== undefined && machine.maxIntervalDistance > 0
      ? machine.maxIntervalDistance
      : undefined;
  const longestRun = Math.max(
    0,
    ...[...history, sample].map((s) => (Number.isFinite(s.distanceOnOil) ? s.distanceOnOil : 0)),
  );
  const ceiling = manufacturer ?? (Math.max(longestRun, regular.value ?? 0) || null);
  const ceilingSource = manufacturer !== undefined ? 'manufacturer' : 'machine-history';
  const unit = machine.distanceUnit;
  const reasons: string[] = [];
  const ruleIds = [...new Set(analysis.findings.map((f) => f.ruleId))];
  const blocks =
    analysis.worst === 'steady' ? findStretchBlocks(sample, history, analysis) : ['not every reading was steady'];
  const stretchReady = blocks.length === 0;

  const r = regular.value;
  // A hold keeps the regular interval as it is (never rounded down); shorter intervals round down to `step`.
  const hold = r === null ? null : ceiling === null ? r : Math.min(ceiling, r);
  const capped = (d: number) => (ceiling === null ? d : Math.min(ceiling, d));
  const shortened = (factor: number) =>
    r === null ? null : capped(Math.max(Math.min(step, r), roundDownTo(r * factor, step)));

  let call: IntervalCall['call'];
  let next: number | null;
  let dueAfter: number | null;
  let urgentDays: number | undefined;

  const acts = analysis.findings.filter((f) => f.level === 'act');
  const causes = analysis.findings.filter((f) => CAUSE_RULES.has(f.ruleId));
  const causeCodes = new Set(causes.flatMap((f) => [...f.measurands, ...(CAUSE_RULES.get(f.ruleId) ?? [])]));
  const otherActs = acts.filter((f) => !CAUSE_RULES.has(f.ruleId) && !f.measurands.every((c) => causeCodes.has(c)));
  if (causes.length > 0 && otherActs.length === 0) {
    call = 'fix-first';
    next = hold;
    dueAfter = r === null ? null : capped(Math.max(Math.min(step, r), roundDownTo(r * p.resampleFraction, step)));
    urgentDays = p.resampleDays;
    reasons.push(
      'The oil is telling you about a cause, not about its own life: fix the cause first, keep the interval as it is, and take another sample soon to check the fix.',
    );
    for (const f of causes) reasons.push(f.sentence);
  } else if (acts.length > 0) {
    call = 'shorten';
    next = shortened(p.actFactor);
    dueAfter = r === null ? null : capped(Math.max(Math.min(step, r), roundDownTo(r * p.resampleFraction, step)));
    urgentDays = p.resampleDays;
    reasons.push(
      `${acts.length} act finding${acts.length > 1 ? 's' : ''}: shorten the interval to about ${Math.round(p.actFactor * 100)} % and take another sample soon to see whether it repeats.`,
    );
    for (const f of acts) reasons.push(f.sentence);
  } else if (analysis.worst === 'watch') {
    call = 'hold';
    next = hold;
    dueAfter = hold;
    const climbing = analysis.findings.some((f) => f.ruleId === 'climbing-trend' || f.ruleId === 'condition-trend');
    reasons.push(
      climbing
        ? 'Something is climbing, though not yet at an act level: hold the interval and take the next sample at the same interval to see whether it keeps going.'
        : 'Watch findings but nothing at an act level: hold the interval and see what the next sample says.',
    );
  } else {
    call = 'hold';
    next = hold;
    const need = p.stretchSteadySamples - 1;
    const run = previous.slice(-need);
    const lastShorten = [...previous].reverse().findIndex((j) => j.call === 'shorten');
    const shortenJudgement = lastShorten === -1 ? undefined : previous[previous.length - 1 - lastShorten];
    const lastStretch = previous.at(-1)?.call === 'stretch' ? previous.at(-1) : undefined;
    const confirmed =
      !shortenJudgement ||
      shortenJudgement.nextIntervalDistance === null ||
      [...run, { distanceOnOil: sample.distanceOnOil }].some(
        (j) => j.distanceOnOil <= 1.1 * shortenJudgement.nextIntervalDistance!,
      );
    const stretched = r === null ? null : Math.min(ceiling ?? Infinity, roundDownTo(r * p.stretchFactor, step));
    if (!stretchReady) {
      reasons.push(`All steady; no stretch yet because ${blocks.join(', and ')}: hold.`);
    } else if (run.length < need || !run.every((j) => j.stretchReady)) {
      reasons.push(
        `All steady this time; a stretch waits for ${p.stretchSteadySamples} steady samples in a row on ready baselines with the oil's condition reported.`,
      );
    } else if (lastShorten !== -1 && lastShorten < need) {
      reasons.push(
        'All steady, but the interval was shortened recently: hold until samples at the shorter interval confirm it.',
      );
    } else if (!confirmed) {
      reasons.push('All steady, but no sample has been drawn at the shortened interval yet to confirm it: hold.');
    } else if (
      lastStretch &&
      lastStretch.nextIntervalDistance !== null &&
      sample.distanceOnOil < 0.9 * lastStretch.nextIntervalDistance
    ) {
      // The stretch stands, but it is not stretched again until a sample at the longer interval confirms it.
      call = 'stretch';
      next = Math.min(ceiling ?? Infinity, lastStretch.nextIntervalDistance);
      reasons.push(
        `All steady: the stretch to about ${Math.round(next)} ${unit} stands. It stretches no further until a sample at that interval confirms it.`,
      );
    } else if (stretched !== null && r !== null && stretched > r) {
      call = 'stretch';
      next = stretched;
      reasons.push(
        `${p.stretchSteadySamples} steady samples in a row on ready baselines, with viscosity, fuel and water in order: the interval can stretch by up to ${Math.round((p.stretchFactor - 1) * 100)} %.`,
      );
    } else {
      reasons.push(
        ceilingSource === 'manufacturer'
          ? "All steady, and the interval is already at the manufacturer's longest: hold."
          : "All steady, but with no manufacturer's longest interval on file the call never goes beyond the longest interval this machine has run: hold.",
      );
    }
    dueAfter = next;
  }

  // Running past the ceiling turns a hold (or a stretch) into a shorten.
  if (r !== null && ceiling !== null && r > ceiling && (call === 'hold' || call === 'stretch')) {
    call = 'shorten';
    next = ceiling;
    dueAfter = ceiling;
    reasons.push(
      `This machine's regular interval of ${Math.round(r)} ${unit} is beyond the longest allowed ${Math.round(ceiling)} ${unit}: bring it back within it.`,
    );
  }
  if (regular.source !== 'completed-oil-changes' && r !== null) {
    reasons.push(
      `No completed oil change on file yet, so the interval taken as regular is ${regular.source === 'manufacturer' ? "the manufacturer's longest" : 'the longest this machine has run'} (${Math.round(r)} ${unit}).`,
    );
  }
  if (r === null)
    reasons.push(
      'No distance on this oil, no earlier one and no manufacturer interval: the interval cannot be set yet.',
    );
  if (analysis.crewReference) {
    const { label, machines } = analysis.crewReference;
    reasons.push(
      `While this machine's own baseline builds, its readings were judged against a crew reference band ${label} (${machines} machines).`,
    );
  }
  for (const note of analysis.notes) reasons.push(note);

  // Dates count from the later of the draw and the day the results arrived, so they are never in the past.
  const drawn = Date.parse(sample.takenAt);
  const arrived = sample.resultsOn ? Date.parse(sample.resultsOn) : NaN;
  const from =
    Number.isFinite(arrived) && (!Number.isFinite(drawn) || arrived > drawn) ? sample.resultsOn! : sample.takenAt;
  const pace = estimatePace(history, sample);
  const days = [
    pace && dueAfter !== null ? dueAfter / pace : Infinity,
    machine.maxIntervalDays ?? Infinity,
    urgentDays ?? Infinity,
  ];
  const dueInDays = Math.max(1, Math.min(...days));
  const date = Number.isFinite(Math.min(...days)) ? addDays(from, dueInDays) : undefined;
  if (
    machine.maxIntervalDays !== undefined &&
    pace !== undefined &&
    dueAfter !== null &&
    dueAfter / pace > machine.maxIntervalDays
  ) {
    reasons.push(`At this machine's pace the calendar limit of ${machine.maxIntervalDays} days comes first.`);
  }
  const dueDistance = dueAfter === null ? null : sample.odometer + dueAfter;
  return {
    call,
    nextIntervalDistance: next,
    nextSampleDue: date ? { distance: dueDistance, date } : { distance: dueDistance },
    reasons,
    basis: {
      worst: analysis.worst,
      regularInterval: r,
      regularSource: regular.source,
      ceiling,
      ceilingSource,
      ruleIds,
      stretchReady,
    },
  };
}

/** One sample as the replay judged it. */
export interface ReplayedSample {
  sampleId: string;
  analysis: SampleAnalysis;
  call: IntervalCall;
}

/**
 * Judges a machine's samples oldest first, each against the samples before it, exactly as production does when
 * each sample's results arrive: a measurand that was act on a sample leaves that measurand's baseline, samples
 * marked baselineExcluded never enter it, and each call knows the calls before it.
 */
export function replayHistory(input: ReplayInput): ReplayedSample[] {
  return [...replaySteps(input)];
}

/** What a replay reads: the machine, its samples oldest first, and the crew's fixed limits. */
export interface ReplayInput {
  machine: MachineProfile;
  samples: readonly SamplePoint[];
  limits?: Partial<FixedLimits> | undefined;
}

/**
 * replayHistory one sample at a time: each step is judged when asked for, so a caller that writes the results as
 * they come (a machine of hundreds of samples) lets each analysis go instead of holding the whole replay.
 */
export function* replaySteps(input: ReplayInput): Generator<ReplayedSample> {
  const outOfBaseline = new Map<string, Set<MeasurandCode>>();
  const previous: PreviousJudgement[] = [];
  for (let i = 0; i < input.samples.length; i += 1) {
    const sample = input.samples[i]!;
    const history = input.samples.slice(Math.max(0, i - HISTORY_TAIL), i);
    const analysis = analyseSample({ machine: input.machine, history, sample, limits: input.limits, outOfBaseline });
    const call = decideIntervalCall({
      machine: input.machine,
      history,
      sample,
      analysis,
      previous: previous.slice(-HISTORY_TAIL),
    });
    let acted: Set<MeasurandCode> | undefined;
    for (const code in analysis.readingLevels) {
      if (analysis.readingLevels[code as MeasurandCode] === 'act') (acted ??= new Set()).add(code as MeasurandCode);
    }
    if (acted) outOfBaseline.set(sample.id, acted);
    previous.push({
      sampleId: sample.id,
      call: call.call,
      worst: analysis.worst,
      stretchReady: call.basis.stretchReady,
      nextIntervalDistance: call.nextIntervalDistance,
      distanceOnOil: sample.distanceOnOil,
    });
    yield { sampleId: sample.id, analysis, call };
  }
}

/**
 * The interval call for a sample after `history` (oldest first). Replays the history to know which readings are
 * in control and what was called before, so it answers as judgeHistory would for the last sample.
 */
export function makeIntervalCall(input: AnalyseInput & { analysis?: SampleAnalysis | undefined }): IntervalCall {
  const replayed = replayHistory({
    machine: input.machine,
    samples: [...input.history, input.sample],
    limits: input.limits,
  });
  const last = replayed[replayed.length - 1]!;
  if (!input.analysis) return last.call;
  const previous = replayed.slice(0, -1).map((r, i) => ({
    sampleId: r.sampleId,
    call: r.call.call,
    worst: r.analysis.worst,
    stretchReady: r.call.basis.stretchReady,
    nextIntervalDistance: r.call.nextIntervalDistance,
    distanceOnOil: input.history[i]!.distanceOnOil,
  }));
  return decideIntervalCall({
    machine: input.machine,
    history: input.history.slice(-HISTORY_TAIL),
    sample: input.sample,
    analysis: input.analysis,
    previous,
  });
}
