/**
 * What the crew home shows: first steps, one card per machine with open findings, and the short lists of what
 * needs doing, in words and links. Pure: no database, no Astro.
 */
import { capitalise, describeFindingReason } from '../analysis/finding-words';
import type { Role } from '../auth/types';
import { CALL_DISPLAY, type Level } from '../levels';
import { formatMeter } from '../units/units';
import { formatCount } from '../words/words';
import { firstSteps, type CrewProgress, type FirstStep, type MachineCard } from './home-cards';
import type { DueMachine } from './home.service';

/** How many entries each list shows before "and N more". */
export const LIST_MAX = 8;

/** A sample row of the home lists, as the repository returns it. */
interface SampleListRow {
  id: string;
  bottle_code: string;
  machine_name: string;
}

export interface CrewHomeInput {
  drawn: readonly (SampleListRow & { drawn_on: string })[];
  overdue: readonly (SampleListRow & { shipped_on: string })[];
  waiting: readonly (SampleListRow & { drawn_on: string })[];
  cards: readonly MachineCard[];
  due: readonly DueMachine[];
  progress: CrewProgress;
}

export interface SampleLink {
  href: string;
  machineName: string;
  bottleCode: string;
  /** "2026-03-01", "drawn 2026-03-01" or "shipped 2026-03-01". */
  when: string;
}

export interface HomeCardView {
  machineId: string;
  machineName: string;
  machineHref: string;
  worst: Level;
  reason: string;
  sentence: string;
  call: { word: string; meaning: string } | null;
  findingsHref: string;
  findingsLabel: string;
  bottleCode: string;
}

export interface HomeView {
  clear: boolean;
  steps: FirstStep[] | null;
  cards: HomeCardView[];
  /** "and 3 more", or '' when every entry is listed. */
  cardsMore: string;
  waiting: SampleLink[];
  waitingMore: string;
  due: {
    href: string;
    name: string;
    overdueWords: string | null;
    dueBy: string | null;
    dueAt: string | null;
    fromManufacturer: boolean;
  }[];
  overdue: SampleLink[];
  drawn: SampleLink[];
  drawnMore: string;
}

/** "and 3 more" past LIST_MAX entries, else ''. */
export function describeMore(n: number): string {
  return n > LIST_MAX ? `and ${n - LIST_MAX} more` : '';
}

function sampleLinks<T extends SampleListRow>(
  rows: readonly T[],
  href: (r: T) => string,
  when: (r: T) => string,
): SampleLink[] {
  return rows
    .slice(0, LIST_MAX)
    .map((r) => ({ href: href(r), machineName: r.machine_name, bottleCode: r.bottle_code, when: when(r) }));
}

/** A machine card in words: the worst finding's reason and sentence, the interval call, the link to all findings. */
export function describeHomeCard(c: MachineCard): HomeCardView {
  return {
    machineId: c.machineId,
    machineName: c.machineName,
    machineHref: `/machines/${c.machineId}`,
    worst: c.worst,
    reason: capitalise(describeFindingReason(c.main.rule_id, c.main.measurand)),
    sentence: c.main.sentence,
    call: c.call ? CALL_DISPLAY[c.call] : null,
    findingsHref: `/samples/${c.sampleId}#findings`,
    findingsLabel: c.count > 1 ? `All ${formatCount(c.count, 'finding')}` : 'The finding',
    bottleCode: c.bottleCode,
  };
}

/** Why a machine is due, in words: by date, by the meter estimate, or from the manufacturer's interval. */
export function describeDue(m: DueMachine): HomeView['due'][number] {
  const byOdometer = m.due.reasons.includes('odometer') && m.nextSampleOdometer !== null && m.estimate;
  return {
    href: `/machines/${m.id}`,
    name: m.name,
    overdueWords: m.overdue && m.overdue.days > 0 ? m.overdue.words : null,
    dueBy: m.due.reasons.includes('date') && m.nextSampleOn ? `Due by ${m.nextSampleOn}. ` : null,
    dueAt: byOdometer
      ? `Due at ${formatMeter(m.nextSampleOdometer!, m.meter)}; from recent riding it is probably at about ${formatMeter(m.estimate!.odometer, m.meter)}. `
      : null,
    fromManufacturer: m.target === 'manufacturer',
  };
}

/** The crew home's model for a member of `role`. */
export function buildHomeView(home: CrewHomeInput, role: Role, crewId: string): HomeView {
  return {
    clear: home.drawn.length + home.overdue.length + home.waiting.length + home.cards.length + home.due.length === 0,
    steps: firstSteps(home.progress, role, crewId),
    cards: home.cards.slice(0, LIST_MAX).map(describeHomeCard),
    cardsMore: describeMore(home.cards.length),
    waiting: sampleLinks(
      home.waiting,
      (s) => `/samples/${s.id}#review`,
      (s) => s.drawn_on,
    ),
    waitingMore: describeMore(home.waiting.length),
    due: home.due.map(describeDue),
    overdue: sampleLinks(
      home.overdue,
      (s) => `/samples/${s.id}`,
      (s) => `shipped ${s.shipped_on}`,
    ),
    drawn: sampleLinks(
      home.drawn,
      (s) => `/samples/${s.id}`,
      (s) => `drawn ${s.drawn_on}`,
    ),
    drawnMore: describeMore(home.drawn.length),
  };
}
