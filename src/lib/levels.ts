import type { Level } from './db/database';

/** How each level is shown: a word, a shape and a colour, so no level relies on colour alone. */
export const LEVEL_DISPLAY: Record<Level, { word: string; shape: 'circle' | 'diamond' | 'octagon'; meaning: string }> = {
  steady: { word: 'Steady', shape: 'circle', meaning: 'Within this engine’s own normal and the fixed limits.' },
  watch: { word: 'Watch', shape: 'diamond', meaning: 'Outside normal or climbing: worth a look and an earlier sample.' },
  act: { word: 'Act', shape: 'octagon', meaning: 'Well outside normal or past a fixed limit: inspect before riding far.' },
};

/** Orders levels so the worst can be picked: steady < watch < act. */
export function levelRank(level: Level): number {
  return level === 'act' ? 2 : level === 'watch' ? 1 : 0;
}
