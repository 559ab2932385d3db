import { describe, expect, test } from 'vitest';
import {
  checkInboundWebhook,
  findMimeProblem,
  formatImportAddress,
  generateImportToken,
  isLabAttachment,
  isSenderAllowed,
  nameAttachment,
  parseImportAddress,
  senderInputSchema,
  signInboundWebhook,
} from '~/lib/lab-mail/lab-mail';
import { composeLabReportArrived } from '~/lib/lab-mail/lab-mail-notice';

const DOMAIN = 'import.sumpwise.test';
const TOKEN = 'abcdefghijklmnopqrstuvwxyz';

describe('import addresses', () => {
  test('a fresh token is 26 base-32 characters, and two are never the same', () => {
    const tokens = new Set(Array.from({ length: 200 }, generateImportToken));
    expect(tokens.size).toBe(200);
    for (const t of tokens) expect(t).toMatch(/^[a-z2-7]{26}$/);
  });

  test.each([
    [`lab-${TOKEN}@${DOMAIN}`, TOKEN],
    [`LAB-${TOKEN.toUpperCase()}@IMPORT.SUMPWISE.TEST`, TOKEN],
    [`lab-${TOKEN}+march@${DOMAIN}`, TOKEN],
    [`lab-${TOKEN}@other.example`, null],
    [`results-${TOKEN}@${DOMAIN}`, null],
    [`lab-short@${DOMAIN}`, null],
    [`lab-${TOKEN}!@${DOMAIN}`, null],
    [`lab-${'a'.repeat(400)}@${DOMAIN}`, null],
    ['no at sign', null],
  ])('parseImportAddress(%j) = %j', (address, token) => {
    expect(parseImportAddress(address, DOMAIN)).toBe(token);
  });

  test('an address round-trips', () => {
    expect(parseImportAddress(formatImportAddress(TOKEN, DOMAIN), DOMAIN)).toBe(TOKEN);
  });
});

describe('senders', () => {
  test.each([
    [[], 'anyone@x.example', true],
    [[], null, true],
    [['results@lab.example'], 'Results@Lab.Example', true],
    [['results@lab.example'], 'other@lab.example', false],
    [['results@lab.example'], null, false],
  ])('isSenderAllowed(%j, %j) = %s', (list, sender, allowed) => {
    expect(isSenderAllowed(list, sender)).toBe(allowed);
  });

  test.each([[' Results@Lab.Example ', 'results@lab.example']])('the allow-list keeps %j as %j', (input, kept) => {
    expect(senderInputSchema.parse(input)).toBe(kept);
  });

  test.each(['nobody', 'a@', `${'a'.repeat(250)}@x.example`])('refuses %j', (input) => {
    expect(senderInputSchema.safeParse(input).success).toBe(false);
  });
});

describe('attachments', () => {
  test.each([
    [{ filename: 'results.csv', contentType: 'application/octet-stream', size: 10 }, true],
    [{ filename: 'RESULTS.XLSX', contentType: 'application/octet-stream', size: 10 }, true],
    [{ filename: 'results.tsv', contentType: 'text/plain', size: 10 }, true],
    [{ filename: 'notes.txt', contentType: 'text/plain', size: 10 }, true],
    [{ filename: 'report.pdf', contentType: 'text/csv', size: 10 }, false],
    [{ filename: 'photo.jpg', contentType: 'image/jpeg', size: 10 }, false],
    [{ filename: 'old.xls', contentType: 'application/vnd.ms-excel', size: 10 }, false],
    [{ contentType: 'text/csv', size: 10 }, true],
    [{ contentType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', size: 10 }, true],
    [{ contentType: 'image/png', size: 10 }, false],
  ])('isLabAttachment(%j) = %s', (a, expected) => {
    expect(isLabAttachment(a)).toBe(expected);
  });

  test.each([
    [{ filename: 'r.csv', contentType: 'text/csv', size: 1 }, 0, 'r.csv'],
    [
      { contentType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', size: 1 },
      1,
      'lab-report-2.xlsx',
    ],
    [{ contentType: 'text/tab-separated-values', size: 1 }, 0, 'lab-report-1.tsv'],
  ])('nameAttachment(%j, %i) = %j', (a, i, name) => {
    expect(nameAttachment(a, i)).toBe(name);
  });
});

describe('MIME sanity', () => {
  test.each([
    ['From: a@b.example\r\nSubject: x\r\n\r\nbody', null],
    ['Date: Fri, 20 Mar 2026 08:00:00 +0000\nContent-Type: multipart/mixed;\n boundary="x"\n\n--x\n', null],
    ['', 'it is empty'],
    ['From: a@b.example\r\nno blank line at all', 'it has no header block followed by a blank line'],
    ['Subject: only\r\n\r\nbody', 'it has no From, Date or Message-ID header'],
    [
      'From: a@b.example\r\nContent-Type: multipart/mixed\r\n\r\nx',
      'it says it has several parts but names no boundary between them',
    ],
    ['From: a@b.example\r\nnot a header\r\n\r\nx', 'a header line is not "Name: value"'],
  ])('findMimeProblem(%j) = %j', (raw, problem) => {
    expect(findMimeProblem(Buffer.from(raw))).toBe(problem);
  });
});

describe('the webhook signature', () => {
  const secret = 'a-secret-of-at-least-thirty-two-chars';
  const body = Buffer.from('From: a@b.example\r\n\r\nx');
  const now = 1_790_000_000;
  const headers = (
    over: Partial<{ timestamp: string | null; recipient: string | null; signature: string | null }> = {},
  ) => ({
    timestamp: String(now),
    recipient: `lab-${TOKEN}@${DOMAIN}`,
    signature: signInboundWebhook(secret, String(now), `lab-${TOKEN}@${DOMAIN}`, body),
    ...over,
  });

  test('is HMAC-SHA256 over timestamp, recipient and body', () => {
    expect(signInboundWebhook(secret, '1', 'r', Buffer.from('b'))).toMatch(/^sha256=[0-9a-f]{64}$/);
    expect(checkInboundWebhook(secret, headers(), body, now)).toBeNull();
    expect(checkInboundWebhook(secret, headers(), body, now + 299)).toBeNull();
  });

  test.each([
    ['another body', headers(), Buffer.from('changed'), now, 'the signature does not match'],
    [
      'another recipient',
      headers({ recipient: `lab-${'b'.repeat(26)}@${DOMAIN}` }),
      body,
      now,
      'the signature does not match',
    ],
    ['a stale timestamp', headers(), body, now + 301, 'the timestamp is missing or more than 5 minutes off'],
    [
      'no signature',
      headers({ signature: null }),
      body,
      now,
      'the timestamp, recipient and signature headers are required',
    ],
    [
      'a non-numeric timestamp',
      headers({ timestamp: '12abc' }),
      body,
      now,
      'the timestamp is missing or more than 5 minutes off',
    ],
  ])('refuses %s', (_what, h, b, at, why) => {
    expect(checkInboundWebhook(secret, h, b, at)).toBe(why);
  });
});

describe('the notice', () => {
  test('names the sender and links every preview; nothing is written without a confirm', () => {
    const notice = composeLabReportArrived({
      crewName: 'Valley',
      sender: 'results@lab.example',
      files: [
        { fileName: 'a.csv', url: 'https://s.test/imports/1' },
        { fileName: 'b.xlsx', url: 'https://s.test/imports/2' },
      ],
    });
    expect(notice).toMatchObject({
      kind: 'lab_report_arrived',
      subject: 'Lab report by mail: a.csv, b.xlsx (Valley)',
      title: '2 lab reports arrived by mail',
      action: { url: 'https://s.test/imports/1' },
    });
    expect(notice.intro).toContain(
      'Nothing is written to your samples until a mechanic or the lead checks the preview and confirms it.',
    );
    expect(notice.lines.map((l) => l.url)).toEqual(['https://s.test/imports/1', 'https://s.test/imports/2']);
  });
});
