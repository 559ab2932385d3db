/** Small wording helpers every screen shares, so a count, a meter or an author is worded one way. Pure. */
import type { Meter, Role } from '../db/database';

/** Nouns whose plural is not the noun plus "s". */
const IRREGULAR: Record<string, string> = {
  finding: 'findings',
  child: 'children',
  person: 'people',
  analysis: 'analyses',
};

/** English plural of a countable noun: "1 sample", "2 samples", "0 samples", "3 machines", "2 boxes". */
export function pluralise(noun: string, n: number): string {
  if (n === 1) return noun;
  if (IRREGULAR[noun]) return IRREGULAR[noun]!;
  if (/(s|x|z|ch|sh)$/.test(noun)) return `${noun}es`;
  if (/[^aeiou]y$/.test(noun)) return `${noun.slice(0, -1)}ies`;
  return `${noun}s`;
}

/** A count with its noun ("1 sample", "12 samples"); thousands grouped the way the rider's locale-free screens do. */
export function formatCount(n: number, noun: string): string {
  return `${n.toLocaleString('en-GB')} ${pluralise(noun, n)}`;
}

/** What the machine's meter is called on forms and table headers: "Hour meter" when it counts hours. */
export function meterLabel(meter: Meter): string {
  return meter === 'h' ? 'Hour meter' : 'Odometer';
}

/** How long ago a due date passed, in the largest whole unit: "due today", "due 3 days ago", "due 7 weeks ago". */
export function describeOverdue(dueOn: string, today: string): { days: number; words: string } | null {
  const days = Math.round((Date.parse(`${today}T00:00:00Z`) - Date.parse(`${dueOn}T00:00:00Z`)) / 86_400_000);
  if (!Number.isFinite(days) || days < 0) return null;
  if (days === 0) return { days, words: 'due today' };
  if (days < 14) return { days, words: `due ${formatCount(days, 'day')} ago` };
  if (days < 61) return { days, words: `due ${formatCount(Math.floor(days / 7), 'week')} ago` };
  return { days, words: `due ${formatCount(Math.floor(days / 30.44), 'month')} ago` };
}

export type CallSource = 'engine' | 'confirmed' | 'override';

const ROLE_WORD: Record<Role, string> = { lead: 'lead', mechanic: 'mechanic', rider: 'rider' };

/**
 * Who made an interval call, worded one way on every screen: "made by the rules", "confirmed by Ada (lead)",
 * "changed by a mechanic". The role comes from the person's membership, never assumed.
 */
export function describeCallAuthor(input: {
  source: CallSource | string;
  role?: Role | null;
  name?: string | null;
}): string {
  if (input.source !== 'confirmed' && input.source !== 'override') return 'made by the rules';
  const verb = input.source === 'confirmed' ? 'confirmed' : 'changed';
  const role = input.role ? ROLE_WORD[input.role] : null;
  const name = input.name?.trim();
  if (name && role) return `${verb} by ${name} (${role})`;
  if (name) return `${verb} by ${name}`;
  if (role) return `${verb} by ${role === 'lead' ? 'the lead' : `a ${role}`}`;
  return `${verb} by a crew member`;
}
