import { describe, expect, test } from 'vitest';
import {
  composeImportFindingsAlert,
  composeSampleDueAlert,
  composeShippedOverdueAlert,
  renderAlertMail,
  renderDigestMail,
} from '~/lib/alerts/alert-mail';
import { composePasswordResetEmail, composeVerificationEmail } from '~/lib/auth/emails';
import { composeInvitationEmail } from '~/lib/crews/emails';

// Invented addresses; the long token stands for a signed unsubscribe or invitation link.
const LONG = `https://sumpwise.test/unsubscribe?token=${'a1b2c3d4e5'.repeat(20)}`;
const links = { unsubscribeUrl: LONG, unsubscribeWhat: 'sample reminders', preferencesUrl: 'https://sumpwise.test/a' };
const due = composeSampleDueAlert({
  crewName: 'Valley school',
  machineName: 'Ridge 450',
  machineUrl: `${LONG}&m=1`,
  drainCardUrl: `${LONG}&drain=1`,
  meter: 'km',
  reasons: ['date'],
  nextSampleOn: '2026-12-01',
  nextSampleOdometer: null,
  estimatedOdometer: null,
});
const shipped = composeShippedOverdueAlert({
  crewName: 'Valley school',
  machineName: 'Ridge 450',
  bottleCode: 'SW-4',
  shippedOn: '2026-11-01',
  days: 30,
  sampleUrl: `${LONG}&s=4`,
});
const imported = composeImportFindingsAlert({
  crewName: 'Valley school',
  fileName: 'march.csv',
  homeUrl: `${LONG}&home=1`,
  machines: [],
});

const MAILS: [string, string][] = [
  ['sample-due reminder', renderAlertMail(due, links).html],
  ['shipped-overdue reminder', renderAlertMail(shipped, links).html],
  ['import alert', renderAlertMail(imported, links).html],
  ['digest', renderDigestMail({ day: '2026-12-02', homeUrl: LONG, entries: [{ crewName: 'V', ...due }] }, links).html],
  ['verification', composeVerificationEmail({ displayName: 'Ada', url: LONG, validHours: 24 }).html],
  ['password reset', composePasswordResetEmail({ displayName: 'Ada', url: LONG, validMinutes: 30 }).html],
  [
    'invitation',
    composeInvitationEmail({ crewName: 'Valley school', inviterName: 'Isla', role: 'rider', url: LONG, validDays: 7 })
      .html,
  ],
];

describe.each(MAILS)('the %s fits a phone mail client', (_name, html) => {
  test('asks for the device width', () => expect(html).toContain('name="viewport" content="width=device-width'));
  test('no fixed width: width attributes are 100 % and no style sets a pixel width', () => {
    const widths = [...html.matchAll(/\swidth="([^"]*)"/g)].map((m) => m[1]);
    expect(widths.length).toBeGreaterThan(0);
    expect(widths.every((w) => w === '100%')).toBe(true);
    expect(html).not.toMatch(/[;"\s]width:\s*\d+px/);
    expect(html).not.toMatch(/min-width:\s*\d{3,}px/);
  });
  test('the message column is capped by max-width', () => expect(html).toMatch(/max-width:\s*\d+px/));
  test('every link whose text is an address may wrap, or the link is a button', () => {
    const anchors = [...html.matchAll(/<a\s[^>]*style="([^"]*)"[^>]*>([^<]*)<\/a>/g)];
    expect(anchors.length).toBeGreaterThan(0);
    for (const [, style, text] of anchors) {
      const isAddress = /^https?:\/\//.test(text!);
      const isButton = /display:inline-block/.test(style!) && /padding:\d+px/.test(style!);
      if (isAddress) expect(style).toContain('word-break:break-all');
      else expect(isButton || text!.length < 60).toBe(true);
    }
    expect(anchors.some(([, style, text]) => text!.startsWith(LONG) && style!.includes('word-break:break-all'))).toBe(
      true,
    );
  });
});
