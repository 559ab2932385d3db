import { describe, expect, test } from 'vitest';
import { readConfig } from '~/lib/config';
import { linkifyText, parseMailboxId, prepareHtmlForFrame } from '~/lib/mail/dev-mailbox';

describe('linkifyText', () => {
  test.each([
    ['no links here', [{ kind: 'text', value: 'no links here' }]],
    [
      'Confirm address:\nhttps://sumpwise.test/verify?token=a&b=1\n',
      [
        { kind: 'text', value: 'Confirm address:\n' },
        { kind: 'link', value: 'https://sumpwise.test/verify?token=a&b=1' },
        { kind: 'text', value: '\n' },
      ],
    ],
    [
      'See http://127.0.0.1:4321/samples/7. Then (https://sumpwise.test/x).',
      [
        { kind: 'text', value: 'See ' },
        { kind: 'link', value: 'http://127.0.0.1:4321/samples/7' },
        { kind: 'text', value: '. Then (' },
        { kind: 'link', value: 'https://sumpwise.test/x' },
        { kind: 'text', value: ').' },
      ],
    ],
    ['javascript:alert(1) is not a link', [{ kind: 'text', value: 'javascript:alert(1) is not a link' }]],
  ])('%j', (input, expected) => {
    expect(linkifyText(input)).toEqual(expected);
    // Nothing is lost or added: the segments put back together are the text.
    expect(
      linkifyText(input)
        .map((s) => s.value)
        .join(''),
    ).toBe(input);
  });
});

describe('prepareHtmlForFrame', () => {
  test.each([
    ['<html><head><title>x</title></head><body><a href="https://a.test">a</a></body></html>'],
    ['<p>fragment without head</p>'],
    ['<HTML><HEAD lang="en"></HEAD></HTML>'],
  ])('adds a no-script policy and new-tab links: %s', (html) => {
    const out = prepareHtmlForFrame(html);
    expect(out).toContain('<base target="_blank">');
    expect(out).toMatch(/Content-Security-Policy" content="default-src 'none'/);
    // The original markup is kept whole.
    expect(out.replace(/<meta http-equiv[^>]*>|<base target="_blank">/g, '')).toBe(html);
  });
});

describe('parseMailboxId', () => {
  test.each([
    ['1', 1],
    ['42', 42],
    ['0', null],
    ['-3', null],
    ['1.5', null],
    ['abc', null],
    ['99999999999999999999', null],
    [undefined, null],
  ])('%s → %s', (input, expected) => {
    expect(parseMailboxId(input)).toBe(expected);
  });
});

describe('the DEV_MAILBOX switch (src/lib/config.ts)', () => {
  // Off unless exactly '1': a production deployment that sets nothing never serves /dev/mailbox.
  test.each([
    [undefined, false],
    ['', false],
    ['0', false],
    ['true', false],
    ['yes', false],
    ['1', true],
  ])('DEV_MAILBOX=%j → %s', (value, on) => {
    expect(readConfig({ DEV_MAILBOX: value }).DEV_MAILBOX).toBe(on);
  });
});
