import { describe, expect, test } from 'vitest';
import jsQR from 'jsqr';
import { PNG } from 'pngjs';
import { buildSampleUrl, renderQrPng, renderQrSvg } from '~/lib/samples/bottle-tag';

describe('bottle tag QR code', () => {
  test.each([
    { base: 'http://127.0.0.1:4321', id: '6f1c2d3e-4b5a-4c6d-8e7f-0123456789ab' },
    { base: 'https://sumpwise.example/', id: '00000000-0000-4000-8000-000000000001' },
  ])('the PNG decodes back to $base/samples/$id', async ({ base, id }) => {
    const url = buildSampleUrl(base, id);
    expect(url).toBe(`${base.replace(/\/$/, '')}/samples/${id}`);
    const png = PNG.sync.read(await renderQrPng(url));
    const decoded = jsQR(new Uint8ClampedArray(png.data), png.width, png.height);
    expect(decoded?.data).toBe(url);
  });

  test('the SVG is a self-contained vector image', async () => {
    const svg = await renderQrSvg('http://127.0.0.1:4321/samples/x');
    expect(svg).toMatch(/^<svg[^>]+viewBox=/);
    expect(svg).toContain('<path');
  });
});
