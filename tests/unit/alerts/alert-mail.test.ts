import { describe, expect, test } from 'vitest';
import {
  buildUnsubscribeHeaders,
  composeImportFindingsAlert,
  composeInvitationPendingAlert,
  IMPORT_ALERT_MACHINES,
  IMPORT_ALERT_SAMPLES_PER_MACHINE,
  composeSampleDueAlert,
  composeShippedOverdueAlert,
  fitSubject,
  renderAlertMail,
  renderDigestMail,
  type ImportFindingInput,
  type ImportMachineInput,
} from '~/lib/alerts/alert-mail';

// Invented demo figures and names throughout.
const BASE = 'https://sumpwise.test';
const links = {
  unsubscribeUrl: `${BASE}/unsubscribe?token=abc.def`,
  unsubscribeWhat: 'e-mails about findings from lab imports of Valley school',
  preferencesUrl: `${BASE}/account/notifications`,
};

const importAlert = composeImportFindingsAlert({
  crewName: 'Valley school',
  fileName: 'march.csv',
  homeUrl: `${BASE}/`,
  machines: [
    {
      name: 'Ridge 450',
      url: `${BASE}/machines/m1`,
      samples: [
        {
          bottleCode: 'SW-4',
          drawnOn: '2026-04-10',
          url: `${BASE}/samples/s4`,
          findings: [
            { level: 'watch', measurand: 'Si', sentence: 'Silicon is above the band: check the air filter.' },
            { level: 'act', measurand: 'Al', sentence: 'Aluminium is at the fixed limit: pistons or bores.' },
          ],
        },
      ],
    },
    {
      name: 'Fjord <690>',
      url: `${BASE}/machines/m2`,
      samples: [
        {
          bottleCode: 'SW-9',
          drawnOn: '2026-04-11',
          url: `${BASE}/samples/s9`,
          findings: [{ level: 'watch', measurand: null, sentence: 'Fuel dilution is raised.' }],
        },
      ],
    },
  ],
});

describe('composeImportFindingsAlert', () => {
  test('one message lists every machine, act before watch, with counts in the intro', () => {
    expect(importAlert.subject).toBe('Act: lab results for Ridge 450, Fjord <690> (Valley school)');
    expect(importAlert.intro).toContain('1 at act and 2 at watch on 2 machines');
    expect(importAlert.intro).toMatch(/advice/);
    const texts = importAlert.lines.map((l) => l.text);
    expect(texts.findIndex((t) => t.startsWith('Act · Al'))).toBeLessThan(
      texts.findIndex((t) => t.startsWith('Watch · Si')),
    );
    expect(importAlert.lines.filter((l) => l.url).map((l) => l.url)).toEqual([
      `${BASE}/machines/m1`,
      `${BASE}/samples/s4`,
      `${BASE}/machines/m2`,
      `${BASE}/samples/s9`,
    ]);
    expect(texts).toContain(
      'Act · Al (bottle SW-4, drawn 10 Apr 2026): Aluminium is at the fixed limit: pistons or bores.',
    );
  });

  test('watch only says watch', () => {
    const watchOnly = composeImportFindingsAlert({
      crewName: 'C',
      fileName: 'f.csv',
      homeUrl: `${BASE}/`,
      machines: [
        {
          name: 'M',
          url: `${BASE}/machines/m`,
          samples: [
            {
              bottleCode: 'B',
              drawnOn: '2026-01-01',
              url: `${BASE}/samples/s`,
              findings: [{ level: 'watch', measurand: 'Fe', sentence: 's' }],
            },
          ],
        },
      ],
    });
    expect(watchOnly.subject.startsWith('Watch:')).toBe(true);
    expect(watchOnly.title).toBe('Lab results to keep an eye on');
  });

  /** `machines` machines of `samples` samples each (oldest first, as the import lists them), each with `findings`. */
  const importMachines = (machines: number, samples: number, findings: ImportFindingInput[]): ImportMachineInput[] =>
    Array.from({ length: machines }, (_, m) => ({
      name: `M${m}`,
      url: `${BASE}/machines/m${m}`,
      samples: Array.from({ length: samples }, (_, i) => ({
        bottleCode: `B${m}-${i}`,
        drawnOn: new Date(Date.UTC(2025, 0, 1 + i)).toISOString().slice(0, 10),
        url: `${BASE}/samples/s${m}-${i}`,
        findings,
      })),
    }));

  /** A big import with one act finding per sample. */
  const bigImport = (machines: number, samples: number) =>
    composeImportFindingsAlert({
      crewName: 'C',
      fileName: 'year.csv',
      homeUrl: `${BASE}/`,
      machines: importMachines(machines, samples, [{ level: 'act', measurand: 'Fe', sentence: 'Iron is at act.' }]),
    });

  test.each([
    // machines, samples each, machines listed, samples listed per machine, "earlier" lines, "more machines" line
    [1, 1, 1, 1, 0, false],
    [1, IMPORT_ALERT_SAMPLES_PER_MACHINE, 1, IMPORT_ALERT_SAMPLES_PER_MACHINE, 0, false],
    [1, 25, 1, IMPORT_ALERT_SAMPLES_PER_MACHINE, 1, false],
    [IMPORT_ALERT_MACHINES, 2, IMPORT_ALERT_MACHINES, 2, 0, false],
    [
      IMPORT_ALERT_MACHINES + 5,
      500,
      IMPORT_ALERT_MACHINES,
      IMPORT_ALERT_SAMPLES_PER_MACHINE,
      IMPORT_ALERT_MACHINES,
      true,
    ],
  ])(
    '%i machines × %i samples: %i machines and %i samples each spelled out',
    (machines, samples, listedMachines, listedSamples, earlierLines, moreLine) => {
      const alert = bigImport(machines, samples);
      const texts = alert.lines.map((l) => l.text);
      // The counts cover the whole import.
      expect(alert.intro).toContain(`${(machines * samples).toLocaleString('en-GB')} at act`);
      expect(alert.lines.filter((l) => l.url?.includes('/machines/'))).toHaveLength(listedMachines);
      expect(alert.lines.filter((l) => l.url?.includes('/samples/'))).toHaveLength(listedMachines * listedSamples);
      expect(texts.filter((t) => / earlier samples? of this import also/.test(t))).toHaveLength(earlierLines);
      expect(texts.some((t) => /more machines? of this import/.test(t))).toBe(moreLine);
      // The newest samples are the ones shown.
      if (samples > IMPORT_ALERT_SAMPLES_PER_MACHINE)
        expect(texts).toContain(`Sample B0-${samples - 1}, readings and findings`);
    },
  );
  // The import's query brings only each machine's newest samples and counts the rest in PostgreSQL: given those
  // counts, the mail is the one the whole list of findings makes.
  test.each([
    // machines, samples each, findings per sample (act, watch)
    [1, 1, 1, 0],
    [1, 3, 0, 2],
    [2, 4, 1, 1],
    [IMPORT_ALERT_MACHINES + 2, 7, 2, 3],
  ])('%i machines × %i samples: the newest samples and their counts make the same mail', (machines, samples, a, w) => {
    const full = importMachines(machines, samples, [
      ...Array.from({ length: a }, (_, k) => ({ level: 'act' as const, measurand: 'Fe', sentence: `Iron ${k}.` })),
      ...Array.from({ length: w }, (_, k) => ({ level: 'watch' as const, measurand: 'Si', sentence: `Dust ${k}.` })),
    ]);
    const cut = full.map((m) => ({
      ...m,
      samples: m.samples.slice(-IMPORT_ALERT_SAMPLES_PER_MACHINE),
      totals: { acts: samples * a, watches: samples * w, samples },
    }));
    const input = { crewName: 'C', fileName: 'year.csv', homeUrl: `${BASE}/` };
    const whole = composeImportFindingsAlert({ ...input, machines: full });
    expect(composeImportFindingsAlert({ ...input, machines: cut })).toEqual(whole);
    expect(whole.intro).toContain(
      [
        a ? `${(machines * samples * a).toLocaleString('en-GB')} at act` : '',
        w ? `${(machines * samples * w).toLocaleString('en-GB')} at watch` : '',
      ]
        .filter(Boolean)
        .join(' and '),
    );
  });
});

describe('renderAlertMail', () => {
  const mail = renderAlertMail(importAlert, links);

  test('the text version has every address alone on its line', () => {
    const lines = mail.text.split('\n');
    for (const url of [
      `${BASE}/machines/m1`,
      `${BASE}/samples/s9`,
      links.unsubscribeUrl,
      links.preferencesUrl,
      `${BASE}/`,
    ]) {
      expect(lines, url).toContain(url);
    }
    expect(mail.text).toContain('Fjord <690>');
  });

  test('the HTML links every address once, escapes names, and has no images', () => {
    for (const url of [
      `${BASE}/machines/m1`,
      `${BASE}/machines/m2`,
      `${BASE}/samples/s4`,
      links.unsubscribeUrl,
      links.preferencesUrl,
    ]) {
      expect(mail.html.split(`<a href="${url}"`).length - 1, url).toBe(1);
    }
    // /machines/m1 must not be linked inside a longer address that starts with it.
    expect(mail.html).not.toMatch(/<a [^>]*>[^<]*<a /);
    expect(mail.html).toContain('Fjord &lt;690&gt;');
    expect(mail.html).not.toContain('Fjord <690>');
    expect(mail.html).not.toMatch(/<img\b/i);
    expect(mail.html).not.toMatch(/url\(/i);
  });

  test('the level is a word, not a colour', () => {
    expect(mail.text).toContain('Act · Al');
    expect(mail.html).toContain('Act · Al');
  });
});

describe('reminders', () => {
  test.each([
    ['by date', ['date'] as const, 'the next sample was due on 1 May 2026'],
    [
      'by odometer (mi machine, stored km)',
      ['odometer'] as const,
      'the next sample is due at 3,107 mi and, from its recent riding, it is probably near 3,169 mi now',
    ],
  ])('sample due %s', (_name, reasons, phrase) => {
    // 5000 km = 3,106.86 mi and 5100 km = 3,169.0 mi (1 mi = 1.609344 km exactly, NIST SP 811 B.8).
    const a = composeSampleDueAlert({
      crewName: 'Valley school',
      machineName: 'Ridge 450',
      machineUrl: `${BASE}/machines/m1`,
      drainCardUrl: `${BASE}/machines/m1/drain-card`,
      meter: 'mi',
      reasons: [...reasons],
      nextSampleOn: '2026-05-01',
      nextSampleOdometer: 5000,
      estimatedOdometer: 5100,
    });
    expect(a.intro).toContain(phrase);
    expect(a.action.url).toBe(`${BASE}/machines/m1/drain-card`);
    expect(a.lines[0]!.text).toMatch(/gloves and eye protection/);
  });

  test('shipped overdue names the bottle and the days', () => {
    const a = composeShippedOverdueAlert({
      crewName: 'Valley school',
      machineName: 'Ridge 450',
      bottleCode: 'SW-7',
      shippedOn: '2026-03-01',
      days: 21,
      sampleUrl: `${BASE}/samples/s7`,
    });
    expect(a.subject).toBe('No results yet: bottle SW-7 of Ridge 450 (Valley school)');
    expect(a.title).toBe('Bottle SW-7: no results after 21 days');
  });

  test.each([
    [false, /spam folder/],
    [true, /expired/],
  ])('invitation pending (expired %s)', (expired, phrase) => {
    const a = composeInvitationPendingAlert({
      crewName: 'Valley school',
      email: 'new@example.test',
      invitedOn: '2026-03-01',
      days: 7,
      crewUrl: `${BASE}/crews/c1`,
      expired,
    });
    expect(a.lines[0]!.text).toMatch(phrase);
    expect(a.intro).toContain('on 1 Mar 2026 and has not accepted after 7 days');
  });
});

describe('renderDigestMail', () => {
  test('groups entries by crew in one message with one unsubscribe link', () => {
    const mail = renderDigestMail(
      {
        day: '2026-04-12',
        homeUrl: `${BASE}/`,
        entries: [
          {
            crewName: 'Valley school',
            title: 'Ridge 450: next sample due',
            lines: [{ text: 'Ridge 450', url: `${BASE}/machines/m1` }],
          },
          { crewName: 'Own bikes', title: 'Bottle SW-7: no results after 21 days', lines: [{ text: 'Ask the lab.' }] },
          { crewName: 'Valley school', title: 'Lab results need a look', lines: [{ text: 'Act · Al' }] },
        ],
      },
      { ...links, unsubscribeWhat: 'the daily digest' },
    );
    expect(mail.subject).toBe('Sumpwise digest 2026-04-12: 3 items');
    expect(mail.text.indexOf('— Valley school —')).toBeLessThan(mail.text.indexOf('— Own bikes —'));
    expect(mail.text.split('— Valley school —').length - 1).toBe(1);
    expect(mail.text).toContain('Stop the daily digest');
    expect(mail.html).toContain(`<a href="${BASE}/machines/m1"`);
  });
});

describe('headers and subjects', () => {
  test('List-Unsubscribe (RFC 2369 §3.2) and List-Unsubscribe-Post (RFC 8058 §3.1)', () => {
    expect(buildUnsubscribeHeaders(`${BASE}/api/unsubscribe?token=t.s`)).toEqual({
      'List-Unsubscribe': `<${BASE}/api/unsubscribe?token=t.s>`,
      'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click',
    });
  });

  test.each([
    ['short', 'Sample due: Ridge 450', 'Sample due: Ridge 450'],
    ['spaces and line breaks collapse', 'Sample  due:\nRidge', 'Sample due: Ridge'],
  ])('fitSubject %s', (_name, input, out) => {
    expect(fitSubject(input)).toBe(out);
  });

  test('a long subject is cut under the 200-character limit of the outbox', () => {
    const long = `Act: lab results for ${Array.from({ length: 40 }, (_, i) => `Machine ${i}`).join(', ')}`;
    const fitted = fitSubject(long);
    expect(fitted.length).toBeLessThanOrEqual(200);
    expect(fitted.endsWith('…')).toBe(true);
  });
});
