/** Level marks and series colours of the wear chart, matching LevelBadge's word + shape + colour. */
import type { Level } from '~/lib/levels';

/** Level colours (tailwind.config.cjs level.*). */
export const LEVEL_COLOURS: Record<Level, string> = { steady: '#2f6b3a', watch: '#8a5a00', act: '#a12a1c' };

/** Line colours for up to eight series, chosen to stay apart for common colour-vision deficiencies. */
export const SERIES_COLOURS = ['#1f4560', '#c15a00', '#6a3d9a', '#00796b', '#7a5c2e', '#b0306a', '#2c5aa0', '#4d6b1f'];

const octagonCache = new Map<string, HTMLCanvasElement>();

/** Pixel size of the act octagon: at least 10 px even on a phone, so its corners read apart from a circle. */
export const ACT_MARKER_PX = 18;

/** A canvas octagon for Chart.js's pointStyle, so act points carry LevelBadge's octagon shape. */
export function drawOctagon(fill: string, size = ACT_MARKER_PX): HTMLCanvasElement | 'rectRounded' {
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
  // Flat sides touch the box (radius to a corner = apothem / cos 22.5°), with room for the white rim, so the
  // cut corners are as large as the size allows and the mark reads as an octagon, not a blurred circle.
  const r = (size / 2 - 1.5) / Math.cos(Math.PI / 8);
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
  ctx.lineWidth = 2;
  ctx.lineJoin = 'miter';
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

/** Hatch direction of a series' band: neighbours lean opposite ways, so overlapping bands cross-hatch. */
export function hatchAngleFor(seriesIndex: number): 45 | 135 {
  return seriesIndex % 2 === 0 ? 45 : 135;
}

const hatchCache = new Map<string, CanvasPattern | string>();

/**
 * The baseline band's fill: thin diagonal lines in the series colour over a clear ground, instead of a
 * translucent wash, so two bands that overlap stay two (their lines cross) and neither muddies the other.
 */
export function bandHatch(colour: string, angle: 45 | 135): CanvasPattern | string {
  const fallback = withAlpha(colour, 0.12);
  if (typeof document === 'undefined') return fallback;
  const key = `${colour}:${angle}`;
  const cached = hatchCache.get(key);
  if (cached) return cached;
  const size = 8;
  const tile = document.createElement('canvas');
  tile.width = size;
  tile.height = size;
  const ctx = tile.getContext('2d');
  if (!ctx) return fallback;
  ctx.strokeStyle = withAlpha(colour, 0.45);
  ctx.lineWidth = 1.25;
  ctx.beginPath();
  // Three strokes so the lines join across tile edges.
  for (const o of [-size, 0, size]) {
    if (angle === 45) {
      ctx.moveTo(o, size);
      ctx.lineTo(o + size, 0);
    } else {
      ctx.moveTo(o, 0);
      ctx.lineTo(o + size, size);
    }
  }
  ctx.stroke();
  const pattern = ctx.createPattern(tile, 'repeat') ?? fallback;
  hatchCache.set(key, pattern);
  return pattern;
}

/** The legend's swatch of the same hatch, in CSS, so the key looks like the band it names. */
export function bandSwatchStyle(colour: string, angle: 45 | 135): { backgroundImage: string; borderColor: string } {
  // CSS gradient angles run clockwise from "up"; the canvas tile's 45 ° lines rise to the right.
  const css = angle === 45 ? 45 : 135;
  return {
    backgroundImage: `repeating-linear-gradient(${css}deg, ${withAlpha(colour, 0.55)} 0 1.5px, transparent 1.5px 5px)`,
    borderColor: colour,
  };
}

/** WCAG 2.x relative luminance of a #rrggbb colour. */
export function relativeLuminance(hex: string): number {
  const n = Number.parseInt(hex.slice(1), 16);
  const lin = (c: number) => {
    const v = c / 255;
    return v <= 0.03928 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * lin((n >> 16) & 255) + 0.7152 * lin((n >> 8) & 255) + 0.0722 * lin(n & 255);
}

/** WCAG 2.x contrast ratio of two #rrggbb colours (1 to 21). */
export function contrastRatio(a: string, b: string): number {
  const [hi, lo] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x) as [number, number];
  return (hi + 0.05) / (lo + 0.05);
}

/** A colour with alpha, for the baseline band fill. */
export function withAlpha(hex: string, alpha: number): string {
  const n = Number.parseInt(hex.slice(1), 16);
  return `rgba(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255}, ${alpha})`;
}
