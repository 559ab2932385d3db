/**
 * A machine's printable history, for the next owner, as a view model: the machine in one line, every oil change,
 * every sample with its key readings, level and call, the findings (worst first within each sample) and the wear
 * parts. Pure: the page renders what this returns.
 */
import { capitalise, describeFindingReason } from '../analysis/finding-words';
import { getMeasurand, type MeasurandCode } from '../analysis/measurands';
import type { IntervalCallKind, Level, Role, SampleState } from '../db/database';
import { CALL_DISPLAY, levelRank } from '../levels';
import type { Machine } from '../machines/machines';
import type { OilChange } from '../oil-changes/oil-changes';
import { formatLength, formatMeter, type MeterUnit } from '../units/units';
import { describeCallAuthor, type CallSource } from '../words/words';
import { formatDay } from '../words/dates';
import type { WearPartDetail } from '../wear-parts/wear-parts.service';

/** The readings the history table shows, in its column order. */
export const HISTORY_MEASURANDS = [
  'Fe',
  'Al',
  'Cr',
  'Cu',
  'Pb',
  'Si',
  'Na',
  'K',
  'FUEL',
  'KV100',
] as const satisfies readonly MeasurandCode[];

export interface HistorySample {
  id: string;
  bottleCode: string;
  drawnOn: string;
  odometer: number;
  distanceOnOil: number | null;
  saeGrade: string | null;
  state: SampleState;
}
export interface HistoryReading {
  sampleId: string;
  measurand: string;
  value: number;
  qualifier: string | null;
}
export interface HistoryFinding {
  sampleId: string;
  measurand: string | null;
  level: Level;
  ruleId: string;
  sentence: string;
}
export interface HistoryCall {
  sampleId: string;
  call: IntervalCallKind;
  source: CallSource;
  note: string;
  createdAt: Date;
  authorRole: Role | null;
  authorName: string | null;
}

export interface MachineHistoryInput {
  machine: Machine;
  lengthUnit: 'in' | 'mm';
  oilChanges: readonly OilChange[];
  samples: readonly HistorySample[];
  readings: readonly HistoryReading[];
  findings: readonly HistoryFinding[];
  /** Newest first: the first call of a sample is its current one. */
  calls: readonly HistoryCall[];
  parts: readonly WearPartDetail[];
  printedOn: string;
}

export interface MachineHistoryView {
  machineId: string;
  machineName: string;
  meter: MeterUnit;
  facts: string;
  summary: string;
  printedOn: string;
  measurands: readonly { code: string; name: string }[];
  oilChanges: { changedOn: string; odometer: string; grade: string; oil: string; filter: string; otherWork: string }[];
  samples: {
    bottleCode: string;
    drawnOn: string;
    odometer: string;
    onOil: string;
    grade: string;
    /** The worst level of a sample with results; null while it waits for them (then `stateWords` says where it is). */
    level: Level | null;
    stateWords: string;
    readings: string[];
    call: { word: string; author: string } | null;
  }[];
  /** Whether any finding is stored at all (the empty state says every reading was steady). */
  hasFindings: boolean;
  findings: {
    level: Level;
    ruleId: string;
    measurand: string;
    title: string;
    sentence: string;
    overrideNote: string | null;
  }[];
  parts: { name: string; newRange: string; serviceLimit: string; lastMeasured: string; lastOdometer: string }[];
}

const hasResults = (s: HistorySample) => s.state === 'results_in' || s.state === 'reviewed';
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

/** Builds the history page's view model from what the repository read. */
export function buildMachineHistory(input: MachineHistoryInput): MachineHistoryView {
  const { machine: m, lengthUnit } = input;
  const meter = m.meter;
  const findingsOf = (id: string) => input.findings.filter((f) => f.sampleId === id);
  const callOf = (id: string) => input.calls.find((c) => c.sampleId === id);
  const worstOf = (id: string): Level =>
    findingsOf(id).reduce<Level>((w, f) => (levelRank(f.level) > levelRank(w) ? f.level : w), 'steady');
  const readingOf = (id: string, code: string) => {
    const r = input.readings.find((x) => x.sampleId === id && x.measurand === code);
    return r ? `${r.qualifier ?? ''}${Number(r.value.toFixed(2))}` : '';
  };
  const withResults = input.samples.filter(hasResults);
  const facts = [
    m.modelYear,
    m.displacementCc ? `${m.displacementCc} cc` : null,
    m.engineLayout,
    `${m.cooling}-cooled`,
    m.sharedOil ? 'engine, gearbox and clutch share the oil' : null,
  ]
    .filter(Boolean)
    .join(' · ');
  return {
    machineId: m.id,
    machineName: m.name,
    meter,
    facts,
    summary: `${plural(withResults.length, 'sample')} with lab results, ${plural(input.oilChanges.length, 'oil change')}.`,
    printedOn: input.printedOn,
    measurands: HISTORY_MEASURANDS.map((code) => ({ code, name: getMeasurand(code).name })),
    oilChanges: [...input.oilChanges]
      .sort((a, b) => a.odometer - b.odometer)
      .map((c) => ({
        changedOn: c.changedOn,
        odometer: formatMeter(c.odometer, meter),
        grade: c.saeGrade,
        oil: c.oilProduct,
        filter: c.filterChanged ? 'changed' : '—',
        otherWork: c.otherWork.join('; '),
      })),
    samples: input.samples.map((s) => {
      const c = callOf(s.id);
      return {
        bottleCode: s.bottleCode,
        drawnOn: s.drawnOn,
        odometer: formatMeter(s.odometer, meter),
        onOil: s.distanceOnOil === null ? '—' : formatMeter(s.distanceOnOil, meter),
        grade: s.saeGrade ?? '—',
        level: hasResults(s) ? worstOf(s.id) : null,
        stateWords: s.state.replace('_', ' '),
        readings: HISTORY_MEASURANDS.map((k) => readingOf(s.id, k)),
        call: c
          ? {
              word: CALL_DISPLAY[c.call].word,
              author: describeCallAuthor({ source: c.source, role: c.authorRole, name: c.authorName }),
            }
          : null,
      };
    }),
    hasFindings: input.findings.length > 0,
    findings: withResults.flatMap((s) => {
      const c = callOf(s.id);
      const overrideNote =
        c?.source === 'override'
          ? `Note with the call (${describeCallAuthor({ source: 'override', role: c.authorRole, name: c.authorName })}): ${c.note}`
          : null;
      return findingsOf(s.id)
        .sort((a, b) => levelRank(b.level) - levelRank(a.level))
        .map((f) => ({
          level: f.level,
          ruleId: f.ruleId,
          measurand: f.measurand ?? '',
          title: `${formatDay(s.drawnOn)} · ${capitalise(describeFindingReason(f.ruleId, f.measurand))}`,
          sentence: f.sentence,
          overrideNote,
        }));
    }),
    parts: input.parts.map(({ part: p, measurements }) => {
      const last = measurements.at(-1);
      return {
        name: p.name,
        newRange: `${formatLength(p.newMinMm, lengthUnit)} to ${formatLength(p.newMaxMm, lengthUnit)}`,
        serviceLimit: formatLength(p.serviceLimitMm, lengthUnit),
        lastMeasured: last
          ? `${formatLength(last.summaryMm, lengthUnit)} on ${formatDay(last.measuredOn)}`
          : 'not measured',
        lastOdometer: last ? formatMeter(last.odometer, meter) : '',
      };
    }),
  };
}
