/** Level marks and series colours of the wear chart, matching LevelBadge's word + shape + colour. */
import type { Level } from '~/lib/levels';

/** Level colours (tailwind.config.cjs level.*). */
export const LEVEL_COLOURS: Record<Level, string> = { steady: '#2f6b3a', watch: '#8a5a00', act: '#a12a1c' };

/** Line colours for up to eight series, chosen to stay apart for common colour-vision deficiencies. */
export const SERIES_COLOURS = ['#1f4560', '#c15a00', '#6a3d9a', '#00796b', '#7a5c2e', '#b0306a', '#2c5aa0', '#4d6b1f'];

const octagonCache = new Map<string, HTMLCanvasElement>();

/** A canvas octagon for Chart.js's pointStyle, so act points carry LevelBadge's octagon shape. */
export function drawOctagon(fill: string, size = 14): HTMLCanvasElement | 'rectRounded' {
  if (typeof document === 'undefined') return 'rectRounded';
  const key = `${fill}:${size}`;
  const cached = octagonCache.get(key);
  if (cached) return cached;
  const canvas = document.createElement('canvas');
  canvas.width = size;
  canvas.height = size;
  const ctx = canvas.getContext('2d');
  if (!ctx) return 'rectRounded';
  const c = size / 2;
  const r = size / 2 - 1;
  ctx.beginPath();
  for (let i = 0; i < 8; i++) {
    const a = Math.PI / 8 + (i * Math.PI) / 4;
    const x = c + r * Math.cos(a);
    const y = c + r * Math.sin(a);
    if (i === 0) ctx.moveTo(x, y);
    else ctx.lineTo(x, y);
  }
  ctx.closePath();
  ctx.fillStyle = fill;
  ctx.fill();
  ctx.lineWidth = 1.5;
  ctx.strokeStyle = '#ffffff';
  ctx.stroke();
  octagonCache.set(key, canvas);
  return canvas;
}

/** Chart.js pointStyle of a level: circle steady, diamond (rectRot) watch, octagon act. */
export function pointStyleFor(level: Level): 'circle' | 'rectRot' | HTMLCanvasElement | 'rectRounded' {
  if (level === 'act') return drawOctagon(LEVEL_COLOURS.act);
  return level === 'watch' ? 'rectRot' : 'circle';
}

/** Point radius grows with the level so concerns stand out even in grey print. */
export function pointRadiusFor(level: Level): number {
  return level === 'act' ? 7 : level === 'watch' ? 6 : 4;
}

/** A colour with alpha, for the baseline band fill. */
export function withAlpha(hex: string, alpha: number): string {
  const n = Number.parseInt(hex.slice(1), 16);
  return `rgba(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255}, ${alpha})`;
}
