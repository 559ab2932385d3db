/** The levels, mildest first: a level's place in this list is its rank, here and in SQL (levels.repository.ts). */
export const LEVELS = ['steady', 'watch', 'act'] as const;
/** How far a reading or a sample is from this engine's normal. */
export type Level = (typeof LEVELS)[number];

/** The interval calls in the order screens list them. */
export const CALL_KINDS = ['shorten', 'hold', 'stretch', 'fix-first'] as const;
/** What the next oil change interval should do. */
export type IntervalCallKind = (typeof CALL_KINDS)[number];

/** How each level is shown: a word, a shape and a colour, so no level relies on colour alone. */
export const LEVEL_DISPLAY: Record<Level, { word: string; shape: 'circle' | 'diamond' | 'octagon'; meaning: string }> =
  {
    steady: { word: 'Steady', shape: 'circle', meaning: 'Within this engine’s own normal and the fixed limits.' },
    watch: {
      word: 'Watch',
      shape: 'diamond',
      meaning: 'Outside normal or climbing: worth a look and an earlier sample.',
    },
    act: {
      word: 'Act',
      shape: 'octagon',
      meaning: 'Well outside normal or past a fixed limit: inspect before riding far.',
    },
  };

/** Orders levels so the worst can be picked: steady 0 < watch 1 < act 2. */
export function levelRank(level: Level): number {
  return LEVELS.indexOf(level);
}

/** The level of a rank as levelRank gives it (and the SQL rank of levels.repository.ts); out of range: steady. */
export function levelOfRank(rank: number): Level {
  return LEVELS[rank] ?? 'steady';
}

/** The more serious of two levels (the first on a tie). */
export function pickWorseLevel(a: Level, b: Level): Level {
  return levelRank(b) > levelRank(a) ? b : a;
}

/** Sort comparator: worst level first. */
export function byLevelWorstFirst(a: Level, b: Level): number {
  return levelRank(b) - levelRank(a);
}

/** How each interval call is named and explained, on every screen, mail and export. */
export const CALL_DISPLAY: Record<IntervalCallKind, { word: string; meaning: string }> = {
  shorten: { word: 'Shorten', meaning: 'Change the oil sooner than usual and take another sample soon.' },
  hold: { word: 'Hold', meaning: 'Keep the usual oil change interval.' },
  stretch: {
    word: 'Stretch',
    meaning: 'The oil can run a little longer next time, within the manufacturer’s longest interval.',
  },
  'fix-first': {
    word: 'Fix first',
    meaning: 'The cause is not the oil: fix it, take another sample soon, interval unchanged.',
  },
};

/** The word of each interval call ("Shorten", "Fix first"), for lists, badges and buttons. */
export const CALL_WORD: Record<IntervalCallKind, string> = Object.fromEntries(
  CALL_KINDS.map((c) => [c, CALL_DISPLAY[c].word]),
) as Record<IntervalCallKind, string>;

/** The calls from most to least urgent (fix-first, shorten, hold, stretch): how lists sort by call. */
export const CALLS_BY_URGENCY: readonly IntervalCallKind[] = ['fix-first', 'shorten', 'hold', 'stretch'];
