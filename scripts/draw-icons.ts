// Draws the app icons' PNG sizes from the SVGs in public/icons with Debian's Chromium (no image library
// with native binaries). Run after changing an SVG: node --import tsx scripts/draw-icons.ts
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { chromium } from 'playwright-core';

const DIR = path.resolve('public/icons');
const SIZES: [svg: string, png: string, size: number][] = [
  ['icon.svg', 'icon-192.png', 192],
  ['icon.svg', 'icon-512.png', 512],
  ['icon-maskable.svg', 'icon-maskable-512.png', 512],
  ['icon.svg', 'apple-touch-icon-180.png', 180],
];

const browser = await chromium.launch({
  executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
  headless: true,
  args: [
    '--no-sandbox',
    '--disable-gpu',
    '--disable-background-networking',
    '--disable-component-update',
    '--no-first-run',
  ],
});
try {
  for (const [svg, png, size] of SIZES) {
    const page = await browser.newPage({ viewport: { width: size, height: size }, deviceScaleFactor: 1 });
    const source = readFileSync(path.join(DIR, svg), 'utf8');
    await page.setContent(
      `<html><body style="margin:0;background:transparent">${source.replace('<svg ', `<svg width="${size}" height="${size}" `)}</body></html>`,
    );
    await page.screenshot({
      path: path.join(DIR, png),
      omitBackground: true,
      clip: { x: 0, y: 0, width: size, height: size },
    });
    await page.close();
  }
} finally {
  await browser.close();
}
