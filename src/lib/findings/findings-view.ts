/**
 * How the findings of one sample were made, as a view model: one card per story (a finding about several
 * readings holds the findings about those same readings at no higher a level), and every reading grouped (wear,
 * contaminants, additives, condition) with its level, the rules that fired and the band it was judged against.
 * Pure: the findings component renders what this returns.
 */
import {
  BASELINE_BASIS,
  findRuleDefinition,
  getMeasurand,
  isMeasurandCode,
  MEASURAND_CODES,
  type DistanceUnit,
  type MeasurandGroup,
} from '../analysis';
import type { Level, SampleState } from '../db/database';
import { levelRank } from '../levels';
import {
  describeBandInPpm,
  describeFindingNumbers,
  formatMeasurandFigure,
  listFindingMeasurands,
} from '../reviews/finding-numbers';
import { glossaryFor, type GlossaryEntry } from '../reviews/glossary';
import { PICKER_GROUPS } from '../trends/trend-types';

export interface FindingsSample {
  id: string;
  state: SampleState;
  distanceOnOil: number | null;
  meter: DistanceUnit;
}
export interface StoredReading {
  measurand: string;
  value: number;
  qualifier: string | null;
}
export interface StoredFinding {
  id: string;
  measurand: string | null;
  level: Level;
  ruleId: string;
  numbers: Record<string, unknown>;
  sentence: string;
}
/** A stored band the rules used, in its own basis; toReported turns its figures into ppm as reported at the sample. */
export interface StoredSampleBand {
  measurand: string;
  basis: 'rate' | 'ppm';
  n: number;
  mean: number;
  watchAbove: number;
  actFrom: number;
  toReported: number;
  source: 'own' | 'crew';
  sourceLabel: string | null;
  sourceMachines: number | null;
}

export interface FindingCard {
  ruleId: string;
  level: Level;
  title: string;
  measurandName: string;
  sentence: string;
  lines: string[];
}
export interface FindingStory extends FindingCard {
  also: FindingCard[];
  /** "2 more findings on these readings:" ('' without any), then what they are: "fixed limit of sodium, potassium". */
  alsoLead: string;
  alsoDetail: string;
}
export interface ReadingRowView {
  measurand: string;
  name: string;
  shown: string;
  level: Level;
  flagged: boolean;
  rulesText: string;
  bandText: string;
  bandQuiet: boolean;
  pointsTo: string;
}
export interface ReadingGroupView {
  group: MeasurandGroup;
  label: string;
  rows: ReadingRowView[];
  worst: Level;
  flagged: number;
  open: boolean;
}

export interface FindingsView {
  /** While this machine's own baseline builds, its bands may come from the crew's other machines of the same engine. */
  crewReference: { label: string | null; machines: number | null } | null;
  hasReadings: boolean;
  hasFindings: boolean;
  stories: FindingStory[];
  groups: ReadingGroupView[];
  glossary: GlossaryEntry[];
  /** Act findings, and any about coolant, fuel or dirt, ask a rider to inspect or ride less before the next change. */
  needsCautions: boolean;
}

const byLevel = <T extends { level: Level }>(a: T, b: T) => levelRank(b.level) - levelRank(a.level);
const titleOf = (ruleId: string) => findRuleDefinition(ruleId)?.title ?? 'Finding';
const nameOf = (code: string | null) => (code && isMeasurandCode(code) ? getMeasurand(code).name : '');
const order = (code: string) => {
  const i = (MEASURAND_CODES as readonly string[]).indexOf(code);
  return i < 0 ? 999 : i;
};
// Only the elements judged as a wear rate get a band of their own; the coolant markers are judged against the oil's own level.
const isBanded = (code: string) => (BASELINE_BASIS.rate as readonly string[]).includes(code);

/** How a reading's value is shown: glycol as present or not, the rest as a figure with its unit and any "<". */
export function showReading(code: string, value: number, qualifier: string | null): string {
  return code === 'GLYCOL'
    ? value > 0
      ? 'present'
      : 'not found'
    : `${qualifier ?? ''}${formatMeasurandFigure(code, value)}`;
}

/** The band a reading was judged against, in the lab's ppm at this sample (the chart draws the same one). */
export function describeReadingBand(code: string, band: StoredSampleBand | undefined): string {
  if (!band)
    return isBanded(code)
      ? 'band still building'
      : (BASELINE_BASIS.ppm as readonly string[]).includes(code)
        ? 'judged against this oil’s own level'
        : '';
  const k = band.toReported;
  const crewWords = band.source === 'crew' ? ` · crew reference, ${band.sourceLabel}` : '';
  return (
    describeBandInPpm({
      mean: band.mean * k,
      watchAbove: band.watchAbove * k,
      actFrom: band.actFrom * k,
      n: band.n,
      perDistance: band.basis === 'rate',
    }) + crewWords
  );
}

/** Builds the findings view of a sample from its stored readings, findings and bands. */
export function buildFindingsView(input: {
  sample: FindingsSample;
  readings: readonly StoredReading[];
  findings: readonly StoredFinding[];
  bands: readonly StoredSampleBand[];
}): FindingsView {
  const { readings, findings } = input;
  const numbersContext = { distanceUnit: input.sample.meter, distanceOnOil: input.sample.distanceOnOil };
  const bandOf = new Map(input.bands.map((b) => [b.measurand, b]));
  const sampleFindings = [...findings].sort(byLevel);
  // A finding about several readings (coolant markers, dirt) names them in its numbers; each of them shows it.
  const codesOf = new Map(
    sampleFindings.map((f) => [
      f,
      listFindingMeasurands({ ruleId: f.ruleId, measurand: f.measurand, numbers: f.numbers }) as string[],
    ]),
  );
  const rows = readings
    .map((r) => {
      const own = findings.filter((f) => f.measurand === r.measurand).sort(byLevel);
      const related = sampleFindings.filter((f) => codesOf.get(f)!.includes(r.measurand));
      const info = isMeasurandCode(r.measurand) ? getMeasurand(r.measurand) : null;
      return {
        r,
        level: own[0]?.level ?? ('steady' as Level),
        related,
        flagged: related.length > 0,
        info,
        group: (info?.group ?? 'condition') as MeasurandGroup,
      };
    })
    .sort(
      (a, b) => byLevel(a, b) || Number(b.flagged) - Number(a.flagged) || order(a.r.measurand) - order(b.r.measurand),
    );
  const anyFlagged = rows.some((x) => x.flagged);
  // One card per story: a finding about several readings (coolant markers: sodium, potassium, boron) holds the
  // findings about those same readings at no higher a level, folded under it, instead of a card each.
  const heldBy = (f: StoredFinding) =>
    sampleFindings.find(
      (g) =>
        g !== f &&
        codesOf.get(g)!.length >= 2 &&
        f.measurand !== null &&
        codesOf.get(g)!.includes(f.measurand) &&
        levelRank(g.level) >= levelRank(f.level) &&
        codesOf.get(f)!.length < 2,
    );
  const card = (f: StoredFinding): FindingCard => ({
    ruleId: f.ruleId,
    level: f.level,
    title: titleOf(f.ruleId),
    measurandName: nameOf(f.measurand),
    sentence: f.sentence,
    lines: describeFindingNumbers({ ruleId: f.ruleId, measurand: f.measurand, numbers: f.numbers }, numbersContext),
  });
  const stories = sampleFindings
    .filter((f) => !heldBy(f))
    .map((main): FindingStory => {
      const also = sampleFindings.filter((f) => heldBy(f) === main);
      const alsoLead =
        also.length === 0
          ? ''
          : `${also.length === 1 ? 'One more finding' : `${also.length} more findings`} on these readings:`;
      const alsoDetail =
        also.length === 0
          ? ''
          : `${[...new Set(also.map((f) => findRuleDefinition(f.ruleId)?.title.toLowerCase() ?? 'finding'))].join(', ')} of ${also.map((f) => nameOf(f.measurand).toLowerCase()).join(', ')}`;
      return { ...card(main), also: also.map(card), alsoLead, alsoDetail };
    });
  const rowViews = rows.map(({ r, level, related, flagged, info, group }) => ({
    group,
    view: {
      measurand: r.measurand,
      name: info?.name ?? '',
      shown: showReading(r.measurand, r.value, r.qualifier),
      level,
      flagged,
      rulesText: related.length ? related.map((f) => titleOf(f.ruleId)).join(', ') : '—',
      bandText: describeReadingBand(r.measurand, bandOf.get(r.measurand)),
      bandQuiet: !bandOf.has(r.measurand) && flagged,
      pointsTo: info?.pointsTo ?? '',
    } satisfies ReadingRowView,
  }));
  const groups = PICKER_GROUPS.map((g) => {
    const own = rowViews.filter((x) => x.group === g.group).map((x) => x.view);
    const worst = own.reduce<Level>((w, x) => (levelRank(x.level) > levelRank(w) ? x.level : w), 'steady');
    const flagged = own.filter((x) => x.flagged).length;
    // Nothing flagged anywhere: the wear metals open, the rest folded.
    return {
      group: g.group,
      label: g.label,
      rows: own,
      worst,
      flagged,
      open: flagged > 0 || (!anyFlagged && g.group === 'wear'),
    };
  }).filter((g) => g.rows.length > 0);
  const crewBand = input.bands.find((b) => b.source === 'crew');
  return {
    crewReference: crewBand ? { label: crewBand.sourceLabel, machines: crewBand.sourceMachines } : null,
    hasReadings: readings.length > 0,
    hasFindings: sampleFindings.length > 0,
    stories,
    groups,
    glossary: glossaryFor(
      readings.map((r) => r.measurand),
      readings.some((r) => r.qualifier === '<'),
    ),
    needsCautions: findings.some(
      (f) => f.level === 'act' || ['coolant-markers', 'fuel-dilution', 'dirt'].includes(f.ruleId),
    ),
  };
}
