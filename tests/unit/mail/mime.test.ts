import nodemailer, { type SendMailOptions } from 'nodemailer';
import { describe, expect, test } from 'vitest';
import {
  decodeBody,
  decodeEncodedWords,
  decodeQuotedPrintable,
  parseContentType,
  parseMime,
  splitMultipart,
} from '~/lib/mail/mime';
import { renderMailLayout } from '~/lib/mail/templates';

const utf8 = (bytes: Uint8Array) => new TextDecoder().decode(bytes);

describe('decodeEncodedWords', () => {
  // RFC 2047 §8, the table of encoded-word examples and how they display (values quoted from memory).
  test.each([
    ['=?ISO-8859-1?Q?a?=', 'a'],
    ['=?ISO-8859-1?Q?a?= b', 'a b'],
    ['=?ISO-8859-1?Q?a?= =?ISO-8859-1?Q?b?=', 'ab'],
    ['=?ISO-8859-1?Q?a?=  =?ISO-8859-1?Q?b?=', 'ab'],
    ['=?ISO-8859-1?Q?a_b?=', 'a b'],
    ['=?ISO-8859-1?Q?a?= =?ISO-8859-2?Q?_b?=', 'a b'],
    ['(=?ISO-8859-1?Q?a?=)', '(a)'],
  ])('RFC 2047 §8: %s → %s', (input, expected) => {
    expect(decodeEncodedWords(input)).toBe(expected);
  });

  test.each([
    // "Ölwechsel" in UTF-8 is C3 96 … (Unicode code chart for U+00D6, UTF-8 encoding by definition, RFC 3629).
    ['=?UTF-8?Q?=C3=96lwechsel?=', 'Ölwechsel'],
    // Base64 of the UTF-8 bytes of "Öl" is w5Zs (RFC 4648 §4 alphabet applied to C3 96 6C).
    ['=?UTF-8?B?w5Zs?=', 'Öl'],
    // A trailing encoded space must survive (nodemailer splits long subjects there).
    ['=?UTF-8?Q?Sumpwise_?= =?UTF-8?Q?=E2=9C=93?=', 'Sumpwise ✓'],
    ['plain subject', 'plain subject'],
  ])('%s → %s', (input, expected) => {
    expect(decodeEncodedWords(input)).toBe(expected);
  });
});

describe('decodeQuotedPrintable', () => {
  // RFC 2045 §6.7: "=XX" is the octet XX; "=" at line end is a soft line break; trailing blanks are dropped.
  test.each([
    ['a=3Db', 'a=b'],
    ['soft=\nbreak', 'softbreak'],
    ['soft=\r\nbreak', 'softbreak'],
    ['trailing   \nline', 'trailing\nline'],
    ['=C3=B6l', 'öl'],
    ['lower =c3=b6', 'lower ö'],
    ['not hex =ZZ', 'not hex =ZZ'],
  ])('%j → %j', (input, expected) => {
    expect(utf8(decodeQuotedPrintable(input))).toBe(expected);
  });
});

describe('parseContentType', () => {
  test.each([
    ['text/plain; charset=utf-8', 'text/plain', { charset: 'utf-8' }],
    ['multipart/alternative; boundary="--_b-1"', 'multipart/alternative', { boundary: '--_b-1' }],
    ['Text/HTML;Charset="ISO-8859-1"', 'text/html', { charset: 'ISO-8859-1' }],
    [undefined, 'text/plain', {}],
  ])('%s', (input, type, params) => {
    const parsed = parseContentType(input);
    expect(parsed.type).toBe(type);
    expect(Object.fromEntries(parsed.params)).toEqual(params);
  });
});

describe('splitMultipart and decodeBody', () => {
  test('splits parts between delimiters and stops at the closing one (RFC 2046 §5.1.1)', () => {
    const body = 'preamble\n--b\nA: 1\n\none\n--b\nA: 2\n\ntwo\n--b--\nepilogue\n';
    expect(splitMultipart(body, 'b')).toEqual(['A: 1\n\none', 'A: 2\n\ntwo']);
  });

  test.each([
    ['base64', Buffer.from('Drain card ✓').toString('base64'), 'utf-8', 'Drain card ✓'],
    ['quoted-printable', 'Drain card =E2=9C=93\n', 'utf-8', 'Drain card ✓'],
    ['7bit', 'plain line\n', undefined, 'plain line'],
    ['quoted-printable', 'caf=E9', 'iso-8859-1', 'café'],
  ])('%s body', (encoding, body, charset, expected) => {
    expect(decodeBody(body, encoding, charset)).toBe(expected);
  });
});

/** The raw message nodemailer itself would put on the wire, so the parser is tested against the real producer. */
async function composeWithNodemailer(message: SendMailOptions): Promise<string> {
  const transport = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'unix' });
  const info = (await transport.sendMail(message)) as { message: Buffer };
  return info.message.toString('utf8');
}

describe('parseMime on messages composed by nodemailer', () => {
  const layout = renderMailLayout({
    title: 'Join the crew of the valley trail school',
    intro: 'A lead invited you as mechanic. Ölwechsel notes, “quotes” and a long line follow: ' + 'wear '.repeat(40),
    paragraphs: ['Key=value pairs survive = signs.'],
    action: { label: 'Accept invitation', url: 'https://sumpwise.test/invitations/accept?token=Zm9v&crew=7' },
  });

  test.each([
    ['ASCII subject, both versions', 'Your bottle tag is ready', layout.text, layout.html],
    ['non-ASCII subject', 'Ölwechsel — interval call: shorten ✓', layout.text, layout.html],
    ['mostly non-ASCII text (nodemailer picks base64)', 'Ölstand', 'ÖÖÖÖ ✓✓✓✓ ßßßß äöü', '<p>ÖÖÖÖ ✓✓✓✓</p>'],
    ['text only', 'Plain reminder', 'Your next sample is due at 12,400 km.', undefined],
  ])('%s', async (_name, subject, text, html) => {
    const raw = await composeWithNodemailer({
      from: 'Sumpwise <no-reply@sumpwise.test>',
      to: 'rider@example.test',
      subject,
      text,
      ...(html ? { html } : {}),
      messageId: '<abc123.mail@sumpwise.test>',
    });
    const parsed = parseMime(raw);
    expect(parsed.subject).toBe(subject);
    expect(parsed.messageId).toBe('<abc123.mail@sumpwise.test>');
    expect(parsed.from).toBe('Sumpwise <no-reply@sumpwise.test>');
    expect(parsed.to).toBe('rider@example.test');
    expect(parsed.text?.replace(/\n$/, '')).toBe(text.replace(/\n$/, ''));
    expect(parsed.html?.replace(/\n$/, '') ?? null).toBe(html ? html.replace(/\n$/, '') : null);
  });

  test('skips attachments and still finds both bodies', async () => {
    const raw = await composeWithNodemailer({
      from: 'a@sumpwise.test',
      to: 'b@example.test',
      subject: 'With file',
      text: 'see file',
      html: '<p>see file</p>',
      attachments: [{ filename: 'readings.csv', content: 'Fe,Al\n12,3\n' }],
    });
    const parsed = parseMime(raw);
    expect(parsed.text).toBe('see file');
    expect(parsed.html).toBe('<p>see file</p>');
  });
});
