/**
 * The words of every alert and reminder, and their rendering into the Sumpwise mail layout. Pure: no
 * database, no clock, no config (addresses and dates are passed in), so the tests read exactly what a rider
 * reads. Lists are paragraphs with the page's address on its own line: the text version stays clickable in
 * every client, and the HTML turns those addresses into links (no images anywhere, so "images off" loses
 * nothing).
 */
import type { AlertLine, Level, Meter, NotificationKind } from '../db/database';
import { byLevelWorstFirst, LEVEL_DISPLAY } from '../levels';
import { WRAPPING_LINK_STYLE, escapeHtml, renderMailLayout } from '../mail/templates';
import { formatDay } from '../words/dates';
import { formatMeter } from '../units/units';
import { formatCount } from '../words/words';

/** One alert before rendering: what the digest keeps of it, and what an immediate mail shows. */
export interface AlertContent {
  kind: NotificationKind;
  subject: string;
  title: string;
  intro: string;
  lines: AlertLine[];
  action: { label: string; url: string };
}

export interface RenderedAlert {
  subject: string;
  text: string;
  html: string;
}

/** The addresses every message ends with. */
export interface AlertFooterLinks {
  unsubscribeUrl: string;
  /** What the unsubscribe link stops, in words ("findings from lab imports of Valley school"). */
  unsubscribeWhat: string;
  preferencesUrl: string;
}

const SUBJECT_MAX = 200;

/** Cuts a subject to the outbox's limit on a word boundary. */
export function fitSubject(subject: string): string {
  const one = subject.replace(/\s+/g, ' ').trim();
  if (one.length <= SUBJECT_MAX) return one;
  const cut = one.slice(0, SUBJECT_MAX - 1);
  return `${cut.slice(0, Math.max(cut.lastIndexOf(' '), SUBJECT_MAX - 40))}…`;
}

export interface ImportFindingInput {
  level: Exclude<Level, 'steady'>;
  measurand: string | null;
  sentence: string;
}

export interface ImportMachineInput {
  name: string;
  url: string;
  /** The machine's samples with findings, oldest first: all of them, or only the newest when `totals` is given. */
  samples: { bottleCode: string; drawnOn: string; url: string; findings: ImportFindingInput[] }[];
  /** Counts over the whole import when `samples` holds only the newest samples; counted from `samples` otherwise. */
  totals?: ImportMachineTotals;
}

/** A machine's findings at act and at watch, and its samples with any, over the whole import. */
export interface ImportMachineTotals {
  acts: number;
  watches: number;
  samples: number;
}

function machineTotals(m: ImportMachineInput): ImportMachineTotals {
  if (m.totals) return m.totals;
  let acts = 0;
  let watches = 0;
  for (const s of m.samples)
    for (const f of s.findings) {
      if (f.level === 'act') acts += 1;
      else watches += 1;
    }
  return { acts, watches, samples: m.samples.length };
}

/**
 * How much of a big import one mail spells out: the newest samples of each machine and the first machines
 * (their pages hold the rest). A mail a phone can scroll, whatever the file's size (common practice, no
 * published source).
 */
export const IMPORT_ALERT_SAMPLES_PER_MACHINE = 3;
export const IMPORT_ALERT_MACHINES = 20;

/**
 * The mail after a lab import: the recipient's machines with findings at watch or act, each with its newest
 * samples' findings (act first); the counts in the opening line cover everything.
 */
export function composeImportFindingsAlert(input: {
  crewName: string;
  fileName: string;
  homeUrl: string;
  machines: ImportMachineInput[];
}): AlertContent {
  const totals = input.machines.map(machineTotals);
  const acts = totals.reduce((sum, t) => sum + t.acts, 0);
  const watches = totals.reduce((sum, t) => sum + t.watches, 0);
  const counted = [
    acts ? `${acts.toLocaleString('en-GB')} at act` : '',
    watches ? `${watches.toLocaleString('en-GB')} at watch` : '',
  ]
    .filter(Boolean)
    .join(' and ');
  const machineNames = input.machines.map((m) => m.name);
  const lines: AlertLine[] = [];
  for (const [index, m] of input.machines.slice(0, IMPORT_ALERT_MACHINES).entries()) {
    lines.push({ text: `${m.name}`, url: m.url });
    const shown = m.samples.slice(-IMPORT_ALERT_SAMPLES_PER_MACHINE);
    const earlier = totals[index]!.samples - shown.length;
    if (earlier > 0)
      lines.push({
        text: `${formatCount(earlier, 'earlier sample')} of this import also ${earlier === 1 ? 'has' : 'have'} findings; the machine page shows them all.`,
      });
    for (const s of shown) {
      const ordered = [...s.findings].sort((a, b) => byLevelWorstFirst(a.level, b.level));
      for (const f of ordered) {
        lines.push({
          text: `${LEVEL_DISPLAY[f.level].word}${f.measurand ? ` · ${f.measurand}` : ''} (bottle ${s.bottleCode}, drawn ${formatDay(s.drawnOn)}): ${f.sentence}`,
        });
      }
      lines.push({ text: `Sample ${s.bottleCode}, readings and findings`, url: s.url });
    }
  }
  const moreMachines = input.machines.length - IMPORT_ALERT_MACHINES;
  if (moreMachines > 0)
    lines.push({
      text: `${formatCount(moreMachines, 'more machine')} of this import ${moreMachines === 1 ? 'has' : 'have'} findings; the crew home lists them.`,
      url: input.homeUrl,
    });
  return {
    kind: 'import_findings',
    subject: fitSubject(`${acts ? 'Act' : 'Watch'}: lab results for ${machineNames.join(', ')} (${input.crewName})`),
    title: acts ? 'Lab results need a look' : 'Lab results to keep an eye on',
    intro: `A lab import in ${input.crewName} (${input.fileName}) brought ${counted} on ${machineNames.length === 1 ? machineNames[0] : formatCount(machineNames.length, 'machine')}. Findings are advice: check them against the service manual, and where work could hurt someone, leave it to a licensed mechanic.`,
    lines,
    action: { label: 'Open the crew home', url: input.homeUrl },
  };
}

/** The reminder that a machine's next sample is due, by date, by estimated odometer, or both. */
export function composeSampleDueAlert(input: {
  crewName: string;
  machineName: string;
  machineUrl: string;
  drainCardUrl: string;
  meter: Meter;
  reasons: ('date' | 'odometer')[];
  nextSampleOn: string | null;
  nextSampleOdometer: number | null;
  estimatedOdometer: number | null;
}): AlertContent {
  const why: string[] = [];
  if (input.reasons.includes('date') && input.nextSampleOn)
    why.push(`the next sample was due on ${formatDay(input.nextSampleOn)}`);
  if (input.reasons.includes('odometer') && input.nextSampleOdometer !== null) {
    const est =
      input.estimatedOdometer === null
        ? ''
        : ` and, from its recent riding, it is probably near ${formatMeter(input.estimatedOdometer, input.meter)} now`;
    why.push(`the next sample is due at ${formatMeter(input.nextSampleOdometer, input.meter)}${est}`);
  }
  return {
    kind: 'sample_due',
    subject: fitSubject(`Sample due: ${input.machineName} (${input.crewName})`),
    title: `${input.machineName}: next sample due`,
    intro: `In ${input.crewName}, ${why.join('; ') || 'the next sample is due'}.`,
    lines: [
      {
        text: 'Draw the sample warm, at the next oil change or from the valve, and fill in a drain card in the garage. Hot oil burns: wear gloves and eye protection, and take the used oil to a collection point.',
      },
      { text: `${input.machineName}, its interval call and wear chart`, url: input.machineUrl },
    ],
    action: { label: 'Fill in a drain card', url: input.drainCardUrl },
  };
}

/** The reminder that a shipped bottle has had no results for `days` days. */
export function composeShippedOverdueAlert(input: {
  crewName: string;
  machineName: string;
  bottleCode: string;
  shippedOn: string;
  days: number;
  sampleUrl: string;
}): AlertContent {
  return {
    kind: 'shipped_overdue',
    subject: fitSubject(`No results yet: bottle ${input.bottleCode} of ${input.machineName} (${input.crewName})`),
    title: `Bottle ${input.bottleCode}: no results after ${formatCount(input.days, 'day')}`,
    intro: `The bottle from ${input.machineName} in ${input.crewName} was shipped on ${formatDay(input.shippedOn)} and no lab results have been imported since.`,
    lines: [
      {
        text: 'Ask the lab whether it arrived, or import their results if they came by another route. A note on the sample keeps the crew in the picture.',
      },
    ],
    action: { label: 'Open the sample', url: input.sampleUrl },
  };
}

/** The reminder to a lead that an invitation has waited `days` days. */
export function composeInvitationPendingAlert(input: {
  crewName: string;
  email: string;
  invitedOn: string;
  days: number;
  crewUrl: string;
  expired: boolean;
}): AlertContent {
  return {
    kind: 'invitation_pending',
    subject: fitSubject(`Invitation to ${input.crewName} not accepted yet: ${input.email}`),
    title: 'An invitation is still waiting',
    intro: `${input.email} was invited to ${input.crewName} on ${formatDay(input.invitedOn)} and has not accepted after ${formatCount(input.days, 'day')}.`,
    lines: [
      {
        text: input.expired
          ? 'The link has expired. If they still want to join, send a new invitation from the crew page.'
          : 'The mail may have gone to their spam folder. You can send a new invitation, or withdraw this one, from the crew page.',
      },
    ],
    action: { label: 'Open the crew page', url: input.crewUrl },
  };
}

/** Renders one alert for immediate delivery, with its unsubscribe and preferences links. */
export function renderAlertMail(content: AlertContent, links: AlertFooterLinks): RenderedAlert {
  const paragraphs = [...content.lines.map(lineParagraph), ...footerParagraphs(links)];
  const { text, html } = renderMailLayout({
    title: content.title,
    intro: content.intro,
    paragraphs,
    action: content.action,
    footer: 'You receive this because of your Sumpwise account and your crew. Findings are advice, not a diagnosis.',
  });
  return {
    subject: content.subject,
    text,
    html: linkifyParagraphs(html, [
      ...content.lines.flatMap((l) => (l.url ? [l.url] : [])),
      links.unsubscribeUrl,
      links.preferencesUrl,
    ]),
  };
}

/** One stored digest item: an alert already composed, with its crew. */
export interface DigestEntry {
  crewName: string;
  title: string;
  lines: AlertLine[];
}

/** Renders the daily digest: every waiting alert of the user, grouped by crew, in one message. */
export function renderDigestMail(
  input: { day: string; homeUrl: string; entries: DigestEntry[] },
  links: AlertFooterLinks,
): RenderedAlert {
  const paragraphs: string[] = [];
  const urls: string[] = [];
  const crews = [...new Set(input.entries.map((e) => e.crewName))];
  for (const crew of crews) {
    paragraphs.push(`— ${crew} —`);
    for (const e of input.entries.filter((x) => x.crewName === crew)) {
      paragraphs.push(e.title);
      for (const l of e.lines) {
        paragraphs.push(lineParagraph(l));
        if (l.url) urls.push(l.url);
      }
    }
  }
  paragraphs.push(...footerParagraphs(links));
  const n = input.entries.length;
  const { text, html } = renderMailLayout({
    title: `Your Sumpwise digest for ${formatDay(input.day)}`,
    intro: `${n} ${n === 1 ? 'thing' : 'things'} from ${crews.join(', ')} since your last digest.`,
    paragraphs,
    action: { label: 'Open the crew home', url: input.homeUrl },
    footer: 'You receive this daily digest because you chose it on your notification settings.',
  });
  return {
    subject: fitSubject(`Sumpwise digest ${input.day}: ${n} ${n === 1 ? 'item' : 'items'}`),
    text,
    html: linkifyParagraphs(html, [...urls, links.unsubscribeUrl, links.preferencesUrl]),
  };
}

/** The List-Unsubscribe headers of RFC 2369 §3.2 and the one-click POST of RFC 8058 §3.1. */
export function buildUnsubscribeHeaders(oneClickUrl: string): Record<string, string> {
  return { 'List-Unsubscribe': `<${oneClickUrl}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' };
}

function lineParagraph(line: AlertLine): string {
  // The address on its own line in the text version; the HTML joins the two with a space and links it.
  return line.url ? `${line.text}:\n${line.url}` : line.text;
}

function footerParagraphs(links: AlertFooterLinks): string[] {
  return [
    `Stop ${links.unsubscribeWhat} (one click, no sign-in):\n${links.unsubscribeUrl}`,
    `Choose what you get, right away or in a daily digest:\n${links.preferencesUrl}`,
  ];
}

/**
 * Turns the given addresses into links inside the layout's plain paragraphs. Only text nodes of <p>
 * elements without markup are touched, so the action button (already a link) is left alone, and only
 * addresses we put there ourselves are linked.
 */
function linkifyParagraphs(html: string, urls: readonly string[]): string {
  const escaped = [...new Set(urls)].map((u) => escapeHtml(u)).sort((a, b) => b.length - a.length);
  if (escaped.length === 0) return html;
  // One pass, longest address first, so an address that starts another one is never linked inside it.
  const pattern = new RegExp(escaped.map((u) => u.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')).join('|'), 'g');
  return html.replace(/(<p\b[^>]*>)([^<]*)(<\/p>)/g, (_m, open: string, body: string, close: string) => {
    const out = body.replace(pattern, (u) => `<a href="${u}" style="${WRAPPING_LINK_STYLE}">${u}</a>`);
    return `${open}${out.replace(/:\n/g, ': ')}${close}`;
  });
}
