import { createRequire } from 'node:module';
import { describe, expect, test } from 'vitest';
import { escapeHtml, renderMailLayout, type MailLayoutInput } from '~/lib/mail/templates';

const require = createRequire(import.meta.url);
// The palette the HTML must use comes from the design tokens, not from this test.
const tailwind = require('../../../tailwind.config.cjs') as {
  theme: { extend: { colors: Record<string, string | Record<string, string>> } };
};
const palette = new Set(
  Object.values(tailwind.theme.extend.colors)
    .flatMap((v) => (typeof v === 'string' ? [v] : Object.values(v)))
    .map((c) => c.toLowerCase()),
);

// Invented demo wording.
const verify: MailLayoutInput = {
  title: 'Confirm your e-mail address',
  intro: 'Welcome to Sumpwise. One step is left before your crew is ready.',
  paragraphs: ['The link works for 24 hours.', 'If you did not sign up, ignore this message.'],
  action: { label: 'Confirm address', url: 'https://sumpwise.test/verify?token=abc&next=%2F' },
};
const digest: MailLayoutInput = {
  title: 'Samples waiting for results',
  intro: 'Two bottles of the valley trail school were shipped more than three weeks ago.',
  paragraphs: ['Bottle SW-0142 (Ridge 450): shipped 3 Nov.', 'Bottle SW-0150 (Marsh 690): shipped 5 Nov.'],
  footer: 'You get this digest as lead of your crew.',
};
const hostile: MailLayoutInput = {
  title: 'Invitation from <script>alert(1)</script>',
  intro: 'A & B "quoted" \'single\'',
  paragraphs: ['<img src="https://tracker.example/x.gif">'],
  action: { label: 'Join <b>crew</b>', url: 'https://sumpwise.test/join?a=1&b="2"' },
};

describe('renderMailLayout', () => {
  test.each([
    ['verify e-mail', verify],
    ['digest without action', digest],
    ['hostile text', hostile],
  ])('%s: the text version carries every word and the bare action address', (_name, input) => {
    const { text } = renderMailLayout(input);
    for (const part of [input.title, input.intro, ...input.paragraphs]) expect(text).toContain(part);
    if (input.action) expect(text.split('\n')).toContain(input.action.url);
    // None of the layout's own markup leaks into the plain version.
    expect(text).not.toMatch(/<(p|table|tr|td|h1|br|html)\b/i);
  });

  test.each([
    ['verify e-mail', verify],
    ['digest without action', digest],
    ['hostile text', hostile],
  ])('%s: the HTML version escapes every word, links the action and loads nothing remote', (_name, input) => {
    const { html } = renderMailLayout(input);
    for (const part of [input.title, input.intro, ...input.paragraphs]) expect(html).toContain(escapeHtml(part));
    if (input.action) {
      expect(html).toContain(`href="${escapeHtml(input.action.url)}"`);
      expect(html).toContain(escapeHtml(input.action.label));
    }
    expect(html).not.toMatch(/<img|<script|<link|<style|url\(/i);
    expect(html).not.toMatch(/\bsrc\s*=\s*["']/i); // a real attribute, not escaped text
    expect(html).toMatch(/^<!doctype html>/);
  });

  test.each([
    ['verify e-mail', verify],
    ['digest without action', digest],
  ])('%s: every colour in the HTML is a Sumpwise design token (tailwind.config.cjs) or white', (_name, input) => {
    const { html } = renderMailLayout(input);
    const colours = [...html.matchAll(/#[0-9a-f]{6}\b/gi)].map((m) => m[0].toLowerCase());
    expect(colours.length).toBeGreaterThan(3);
    for (const c of colours) expect(c === '#ffffff' || palette.has(c), c).toBe(true);
    expect(colours).toContain('#0f2536'); // steel-900, the header band
  });

  test('uses the given footer, or a default one', () => {
    expect(renderMailLayout(digest).text).toContain('You get this digest as lead of your crew.');
    expect(renderMailLayout(verify).text).toContain('You receive this because of your Sumpwise account.');
  });

  test.each([['javascript:alert(1)'], ['data:text/html,hi'], ['/relative/path'], ['not a url']])(
    'refuses an action address that is not http(s): %s',
    (url) => {
      expect(() => renderMailLayout({ ...verify, action: { label: 'Go', url } })).toThrow(/url/);
    },
  );
});

describe('escapeHtml', () => {
  test.each([
    ['<a href="x">', '&lt;a href=&quot;x&quot;&gt;'],
    ["it's & done", 'it&#39;s &amp; done'],
    ['plain', 'plain'],
  ])('%s', (input, expected) => {
    expect(escapeHtml(input)).toBe(expected);
  });
});
