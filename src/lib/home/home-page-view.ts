/**
 * What the crew home shows: first steps, one card per machine with open findings, and the short lists of what
 * needs doing, in words and links. Pure: no database, no Astro.
 */
import { capitalise, describeFindingReason } from '../analysis/finding-words';
import type { Role } from '../auth/types';
import { canConfirmSteadyCalls, canReviewSample } from '../auth/permissions';
import { CALL_DISPLAY, type IntervalCallKind, type Level } from '../levels';
import type { Verdict } from '../verdicts/verdicts';
import { formatMeter } from '../units/units';
import { formatCount } from '../words/words';
import { formatDay } from '../words/dates';
import { firstSteps, type CrewProgress, type FirstStep, type MachineCard } from './home-cards';
import type { DueMachine } from './home.service';
import { isUuid } from '../ids';
import { STEADY_BATCH_MAX } from '../reviews/reviews';

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
  /** The verdicts of the waiting samples, by sample id. */
  waitingVerdicts?: ReadonlyMap<string, Verdict>;
  /** Steady hold or stretch calls waiting for review: what one step confirms. */
  steadyCount?: number;
  cards: readonly MachineCard[];
  due: readonly DueMachine[];
  progress: CrewProgress;
}

export interface SampleLink {
  href: string;
  machineName: string;
  bottleCode: string;
  /** "1 Mar 2026", "drawn 1 Mar 2026" or "shipped 1 Mar 2026". */
  when: string;
  /** The day of `when` as ISO, for the datetime attribute. */
  whenOn: string;
  /** For samples with results: the level and the call. */
  level?: Level;
  call?: IntervalCallKind | null;
}

export interface HomeCardView {
  machineId: string;
  sampleId: string;
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

/**
 * The home's one filled button, chosen by state: the worst machine when it is at act, else the one-step
 * confirmation of steady calls, else the worst machine at watch, else a new crew's next first step.
 */
export type HomePrimary =
  | { kind: 'card'; machineId: string; label: string; href: string }
  | { kind: 'confirm-steady' }
  | { kind: 'step'; key: FirstStep['key']; label: string; href: string }
  | null;

export interface HomeView {
  clear: boolean;
  primary: HomePrimary;
  steps: FirstStep[] | null;
  cards: HomeCardView[];
  /** "and 3 more", or '' when every entry is listed. */
  cardsMore: string;
  waiting: SampleLink[];
  waitingMore: string;
  /** "Confirm 12 steady calls", for a reviewer when there are any. */
  steadyConfirm: { count: number; label: string } | null;
  due: {
    href: string;
    name: string;
    overdueWords: string | null;
    /** The ISO day the next sample is due by, when a date is a reason (the page writes "Due by 1 Feb 2026."). */
    dueOn: string | null;
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
  when: (r: T) => { words: string; on: string },
): SampleLink[] {
  return rows.slice(0, LIST_MAX).map((r) => {
    const { words, on } = when(r);
    const day = formatDay(on);
    return {
      href: href(r),
      machineName: r.machine_name,
      bottleCode: r.bottle_code,
      when: words ? `${words} ${day}` : day,
      whenOn: on.slice(0, 10),
    };
  });
}

/** A machine card in words: the worst finding's reason and sentence, the interval call, the link to all findings. */
export function describeHomeCard(c: MachineCard): HomeCardView {
  return {
    machineId: c.machineId,
    sampleId: c.sampleId,
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
    dueOn: m.due.reasons.includes('date') && m.nextSampleOn ? m.nextSampleOn.slice(0, 10) : null,
    dueAt: byOdometer
      ? `Due at ${formatMeter(m.nextSampleOdometer!, m.meter)}; from recent riding it is probably at about ${formatMeter(m.estimate!.odometer, m.meter)}. `
      : null,
    fromManufacturer: m.target === 'manufacturer',
  };
}

/** The one filled button of the home (see HomePrimary). */
export function chooseHomePrimary(
  v: Pick<HomeView, 'cards' | 'steadyConfirm' | 'steps'>,
  waitingIds: ReadonlySet<string>,
  reviewer: boolean,
): HomePrimary {
  const worst = v.cards[0];
  const card = (c: HomeCardView): HomePrimary =>
    reviewer && waitingIds.has(c.sampleId)
      ? { kind: 'card', machineId: c.machineId, label: 'Review this sample', href: `/samples/${c.sampleId}#review` }
      : { kind: 'card', machineId: c.machineId, label: 'Read the findings', href: c.findingsHref };
  if (worst?.worst === 'act') return card(worst);
  if (v.steadyConfirm) return { kind: 'confirm-steady' };
  if (worst) return card(worst);
  const next = v.steps?.find((st) => !st.done);
  return next ? { kind: 'step', key: next.key, label: next.label, href: next.href } : null;
}

/**
 * The one banner a newcomer sees after sign-up: a welcome, and where the confirmation link went while the
 * address is unconfirmed. Null without the sign-up's `welcome` flag.
 */
export function buildWelcomeNotice(
  query: URLSearchParams,
  user: { email: string; emailVerified: boolean },
): string | null {
  if (query.get('welcome') !== '1') return null;
  return user.emailVerified
    ? 'Welcome to Sumpwise.'
    : `Welcome to Sumpwise. We sent a link to ${user.email} to confirm the address.`;
}

/** The crew home's model for a member of `role`. */
export function buildHomeView(home: CrewHomeInput, role: Role, crewId: string): HomeView {
  const view = buildHomeLists(home, role, crewId);
  const reviewer = canReviewSample({ crewId, crewName: '', role });
  return { ...view, primary: chooseHomePrimary(view, new Set(home.waiting.map((w) => w.id)), reviewer) };
}

function buildHomeLists(home: CrewHomeInput, role: Role, crewId: string): Omit<HomeView, 'primary'> {
  return {
    clear: home.drawn.length + home.overdue.length + home.waiting.length + home.cards.length + home.due.length === 0,
    steps: firstSteps(home.progress, role, crewId),
    cards: home.cards.slice(0, LIST_MAX).map(describeHomeCard),
    cardsMore: describeMore(home.cards.length),
    waiting: sampleLinks(
      home.waiting,
      (s) => `/samples/${s.id}#review`,
      (s) => ({ words: '', on: s.drawn_on }),
    ).map((link, i) => {
      const v = home.waitingVerdicts?.get(home.waiting[i]!.id);
      return v ? { ...link, level: v.level, call: v.call } : link;
    }),
    waitingMore: describeMore(home.waiting.length),
    steadyConfirm:
      home.steadyCount && canConfirmSteadyCalls({ crewId, crewName: '', role })
        ? {
            count: Math.min(home.steadyCount, STEADY_BATCH_MAX),
            label: `Confirm ${formatCount(Math.min(home.steadyCount, STEADY_BATCH_MAX), 'steady call')}`,
          }
        : null,
    due: home.due.map(describeDue),
    overdue: sampleLinks(
      home.overdue,
      (s) => `/samples/${s.id}`,
      (s) => ({ words: 'shipped', on: s.shipped_on }),
    ),
    drawn: sampleLinks(
      home.drawn,
      (s) => `/samples/${s.id}`,
      (s) => ({ words: 'drawn', on: s.drawn_on }),
    ),
    drawnMore: describeMore(home.drawn.length),
  };
}

/** What the review queue's notice says after a one-step confirmation, its undo, or a refusal. */
export type QueueNotice =
  { kind: 'confirmed'; words: string; undoIds: string } | { kind: 'undone' | 'error'; words: string } | null;

const QUEUE_ERRORS: Record<string, string> = {
  undo_expired: 'The time to undo has passed: open a sample to change its call.',
  changed: 'A call was changed since, so nothing was undone: open that sample to change it.',
  not_found: 'Nothing to undo.',
};

/**
 * The notice from the query a one-step confirmation (or its undo) redirects to. Only counts, ids and known codes
 * are read, so a crafted link cannot put words of its own on the page.
 */
export function buildQueueNotice(query: URLSearchParams): QueueNotice {
  const count = (v: string | null) => (v && /^\d{1,4}$/.test(v) ? Number(v) : null);
  const confirmed = count(query.get('steady_confirmed'));
  if (confirmed !== null) {
    const ids = (query.get('undo') ?? '').split(',').filter((id) => isUuid(id));
    const words =
      confirmed === 0 ? 'No steady calls were waiting.' : `Confirmed ${formatCount(confirmed, 'steady call')}.`;
    return { kind: 'confirmed', words, undoIds: confirmed > 0 ? ids.slice(0, STEADY_BATCH_MAX).join(',') : '' };
  }
  const undone = count(query.get('steady_undone'));
  if (undone !== null) return { kind: 'undone', words: `Undone: ${formatCount(undone, 'sample')} back to results in.` };
  const error = query.get('steady_error');
  if (error) return { kind: 'error', words: QUEUE_ERRORS[error] ?? 'That did not work; nothing was changed.' };
  return null;
}
