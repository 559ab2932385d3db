import { describe, expect, test } from 'vitest';
import {
  buildPreferenceFieldName,
  DEFAULT_DELIVERY,
  NOTIFICATION_KINDS,
  parsePreferenceForm,
} from '~/lib/notification-preferences/notification-preferences';

const CREW = '6f1c2a9e-3b7d-4c55-9a1e-2d4f6b8c0e11';

describe('parsePreferenceForm', () => {
  test.each([
    [
      'one choice',
      [[buildPreferenceFieldName(CREW, 'sample_due'), 'digest']],
      [{ crewId: CREW, kind: 'sample_due', delivery: 'digest' }],
      [],
    ],
    [
      'fields that are not choices are ignored',
      [
        ['action', 'save'],
        ['other', 'x'],
      ],
      [],
      [],
    ],
    ['an unknown delivery', [[`pref.${CREW}.sample_due`, 'hourly']], [], [`pref.${CREW}.sample_due`]],
    ['an unknown kind', [[`pref.${CREW}.marketing`, 'off']], [], [`pref.${CREW}.marketing`]],
    ['a crew that is not an id', [['pref.crew-a.sample_due', 'off']], [], ['pref.crew-a.sample_due']],
  ])('%s', (_name, entries, choices, errorFields) => {
    const parsed = parsePreferenceForm(new URLSearchParams(entries as [string, string][]));
    expect(parsed.choices).toEqual(choices);
    expect(Object.keys(parsed.errors)).toEqual(errorFields);
  });

  test('every kind has a default', () => {
    for (const kind of NOTIFICATION_KINDS) expect(['immediate', 'digest', 'off']).toContain(DEFAULT_DELIVERY[kind]);
  });
});
