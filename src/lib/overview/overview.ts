/** Crew overview: the query a page address carries (sort, filters, page) and the row shape. Pure. */
import type { IntervalCallKind, Level, Meter, Role } from '../db/database';
import { CALL_KINDS } from '../levels';

export const OVERVIEW_SORTS = ['name', 'last-sample', 'level', 'call', 'due'] as const;
export type OverviewSort = (typeof OVERVIEW_SORTS)[number];
export type SortDirection = 'asc' | 'desc';

/** Rows per page; 50 keeps a phone page short and 2,000 machines at 40 pages. */
export const OVERVIEW_PAGE_SIZE = 50;

export interface OverviewQuery {
  sort: OverviewSort;
  dir: SortDirection;
  /** Worst level of the last sample; 'none' means no results yet. */
  level: Level | 'none' | null;
  call: IntervalCallKind | null;
  climbing: boolean;
  /** Part of the machine's name. */
  q: string;
  page: number;
}

export const DEFAULT_OVERVIEW_QUERY: OverviewQuery = {
  sort: 'level',
  dir: 'desc',
  level: null,
  call: null,
  climbing: false,
  q: '',
  page: 1,
};

/** The direction a sort starts in: the worst level and the most recent sample first, names A to Z. */
const NATURAL_DIR: Record<OverviewSort, SortDirection> = {
  name: 'asc',
  'last-sample': 'desc',
  level: 'desc',
  call: 'asc',
  due: 'asc',
};

function pick<T extends string>(value: string | null, allowed: readonly T[]): T | undefined {
  return value !== null && (allowed as readonly string[]).includes(value) ? (value as T) : undefined;
}

/**
 * Reads the overview query from a page address. Unknown values fall back to the defaults and are named in
 * `ignored`, so a hand-edited or stale link still shows a page and says what it ignored.
 */
export function parseOverviewQuery(params: URLSearchParams): { query: OverviewQuery; ignored: string[] } {
  const ignored: string[] = [];
  const read = <T extends string>(name: string, allowed: readonly T[]): T | undefined => {
    const raw = params.get(name);
    if (raw === null || raw === '') return undefined;
    const v = pick(raw, allowed);
    if (v === undefined) ignored.push(name);
    return v;
  };
  const sort = read('sort', OVERVIEW_SORTS) ?? DEFAULT_OVERVIEW_QUERY.sort;
  const dir = read('dir', ['asc', 'desc'] as const) ?? NATURAL_DIR[sort];
  const level = read('level', ['steady', 'watch', 'act', 'none'] as const) ?? null;
  const call = read('call', CALL_KINDS) ?? null;
  const climbingRaw = params.get('climbing');
  const climbing = climbingRaw === '1' || climbingRaw === 'on' || climbingRaw === 'true';
  if (climbingRaw !== null && climbingRaw !== '' && !climbing && climbingRaw !== '0') ignored.push('climbing');
  const q = (params.get('q') ?? '').trim().slice(0, 80);
  const pageRaw = params.get('page');
  let page = 1;
  if (pageRaw !== null && pageRaw !== '') {
    const n = Number(pageRaw);
    if (Number.isInteger(n) && n >= 1 && n <= 100_000) page = n;
    else ignored.push('page');
  }
  return { query: { sort, dir, level, call, climbing, q, page }, ignored };
}

/** The address of the overview with some of the query changed (page back to 1 unless the page is what changed). */
export function buildOverviewHref(query: OverviewQuery, change: Partial<OverviewQuery>): string {
  const next: OverviewQuery = { ...query, page: 1, ...change };
  const params = new URLSearchParams();
  if (next.sort !== DEFAULT_OVERVIEW_QUERY.sort) params.set('sort', next.sort);
  if (next.dir !== NATURAL_DIR[next.sort]) params.set('dir', next.dir);
  if (next.level) params.set('level', next.level);
  if (next.call) params.set('call', next.call);
  if (next.climbing) params.set('climbing', '1');
  if (next.q) params.set('q', next.q);
  if (next.page > 1) params.set('page', String(next.page));
  const s = params.toString();
  return s ? `/overview?${s}` : '/overview';
}

/** The direction a column header link asks for: the other way when it is already the sort. */
export function toggleSort(query: OverviewQuery, sort: OverviewSort): Partial<OverviewQuery> {
  if (query.sort !== sort) return { sort, dir: NATURAL_DIR[sort] };
  return { sort, dir: query.dir === 'asc' ? 'desc' : 'asc' };
}

export interface OverviewRow {
  machineId: string;
  name: string;
  meter: Meter;
  lastSample: { id: string; bottleCode: string; drawnOn: string; state: string } | null;
  worst: Level | null;
  /** The worst finding's rule and element, for a one-line reason. */
  topFinding: { ruleId: string; measurand: string | null; sentence: string } | null;
  climbing: string[];
  call: {
    kind: IntervalCallKind;
    source: string;
    authorRole: Role | null;
    authorName: string | null;
    nextSampleOn: string | null;
    nextSampleOdometer: number | null;
  } | null;
}

export interface OverviewPage {
  rows: OverviewRow[];
  total: number;
  page: number;
  pages: number;
}
