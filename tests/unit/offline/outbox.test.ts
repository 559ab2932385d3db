import { describe, expect, test } from 'vitest';
import {
  checkSession,
  editUrlOf,
  judgeAnswer,
  labelOf,
  requestOf,
  sendable,
  STATE_LOOK,
  type OutboxItem,
  type OutboxSession,
  type OutboxState,
} from '~/lib/offline/outbox';

const CREW = '11111111-1111-4111-8111-111111111111';
const OTHER_CREW = '22222222-2222-4222-8222-222222222222';
const MACHINE = '33333333-3333-4333-8333-333333333333';
const PART = '44444444-4444-4444-8444-444444444444';

function item(over: Partial<OutboxItem> = {}): OutboxItem {
  return {
    key: 'k-0001-abcd',
    kind: 'drain-card',
    userId: 'user-a',
    crewId: CREW,
    crewName: 'Valley School',
    machineId: MACHINE,
    machineName: 'Shed 690',
    label: 'Bottle ABC',
    fields: { bottleCode: 'ABC123', odometer: '5200' },
    photos: [],
    savedAt: '2026-12-01T10:00:00.000Z',
    state: 'waiting',
    attempts: 0,
    ...over,
  };
}

const member: OutboxSession = {
  userId: 'user-a',
  crewId: CREW,
  crews: [
    { crewId: CREW, crewName: 'Valley School' },
    { crewId: OTHER_CREW, crewName: 'Own crew' },
  ],
};

describe('requestOf: the request a queued write becomes, always with its client key', () => {
  test.each([
    ['drain-card', {}, '/api/samples', { machineId: MACHINE }],
    ['oil-change', {}, `/api/machines/${MACHINE}/oil-changes`, {}],
    ['wear-reading', { partId: PART }, `/api/wear-parts/${PART}/measurements`, {}],
  ] as const)('%s', (kind, extra, url, more) => {
    const r = requestOf(item({ kind, ...extra }));
    expect(r.url).toBe(url);
    expect(r.json).toEqual({ bottleCode: 'ABC123', odometer: '5200', clientKey: 'k-0001-abcd', ...more });
    expect(r.multipart).toBe(false);
  });

  test('an oil change with photos goes as multipart', () => {
    const photo = { name: 'a.png', type: 'image/png', blob: new Blob([new Uint8Array([1, 2, 3])]) };
    expect(requestOf(item({ kind: 'oil-change', photos: [photo] })).multipart).toBe(true);
  });
});

describe('judgeAnswer: what an answer to a queued write means', () => {
  test.each<[string, number | null, unknown, string, OutboxState | null]>([
    ['network failure', null, null, 'retry', null],
    ['server error', 500, null, 'retry', null],
    ['unavailable', 503, { error: { code: 'storage_unavailable', message: 'x' } }, 'retry', null],
    ['busy (rate limited)', 429, null, 'retry', null],
    ['time-out', 408, null, 'retry', null],
    ['session ended', 401, { error: { code: 'unauthenticated', message: 'Sign in.' } }, 'hold', 'sign-in'],
    [
      'other crew',
      409,
      { error: { code: 'other_crew', message: 'This was saved in Own crew; switch.' } },
      'hold',
      'other-crew',
    ],
    ['left the crew', 409, { error: { code: 'not_a_member', message: 'No longer a member.' } }, 'hold', 'not-member'],
    [
      'code already used',
      409,
      {
        error: {
          code: 'duplicate_bottle_code',
          message: 'That bottle code is already used.',
          fields: { bottleCode: 'On a sample of Shed 690.' },
        },
      },
      'hold',
      'refused',
    ],
    [
      'machine gone',
      404,
      { error: { code: 'not_found', message: 'No such machine in your crew.' } },
      'hold',
      'refused',
    ],
    [
      'forbidden',
      403,
      { error: { code: 'forbidden', message: 'Only the machine’s rider or a crew lead can register its samples.' } },
      'hold',
      'refused',
    ],
  ])('%s', (_name, status, body, kind, state) => {
    const v = judgeAnswer(item(), status, body);
    expect(v.kind).toBe(kind);
    if (v.kind === 'hold') expect(v.state).toBe(state);
  });

  test('a refusal keeps the server’s sentence and the field’s', () => {
    const v = judgeAnswer(item(), 409, {
      error: {
        code: 'duplicate_bottle_code',
        message: 'That bottle code is already used.',
        fields: { bottleCode: 'On a sample of Shed 690.' },
      },
    });
    expect(v).toEqual({
      kind: 'hold',
      state: 'refused',
      message: 'That bottle code is already used. On a sample of Shed 690.',
      fields: { bottleCode: 'On a sample of Shed 690.' },
    });
  });

  test.each([
    [201, { sample: { id: 'S1' } }, 'drain-card', `/samples/S1`],
    [200, { sample: { id: 'S1' }, repeated: true }, 'drain-card', `/samples/S1`],
    [201, { oilChange: { id: 'O1' } }, 'oil-change', `/machines/${MACHINE}`],
    [201, { measurement: {} }, 'wear-reading', `/machines/${MACHINE}/wear-parts/${PART}`],
  ] as const)('%i sent: opens %s', (status, body, kind, url) => {
    expect(judgeAnswer(item({ kind, partId: PART }), status, body)).toEqual({ kind: 'sent', url });
  });
});

describe('checkSession: sent only under the account and crew it was written in', () => {
  test.each<[string, OutboxSession | null, boolean, OutboxState | null, RegExp | null]>([
    ['same account and crew', member, true, null, null],
    ['signed out', null, false, 'sign-in', /Sign in again with the same account/],
    ['another account', { ...member, userId: 'user-b' }, false, 'sign-in', /another account/],
    ['switched to another crew', { ...member, crewId: OTHER_CREW }, false, 'other-crew', /Switch to that crew/],
    [
      'no longer a member',
      { ...member, crews: [{ crewId: OTHER_CREW, crewName: 'Own crew' }], crewId: OTHER_CREW },
      false,
      'not-member',
      /no longer a member of Valley School/,
    ],
  ])('%s', (_name, session, ok, state, sentence) => {
    const r = checkSession(item(), session);
    expect(r.ok).toBe(ok);
    if (!r.ok) {
      expect(r.state).toBe(state);
      expect(r.message).toMatch(sentence!);
    }
  });
});

describe('sendable and the list', () => {
  test('refused and left-behind writes are not resent; the rest go oldest first', () => {
    const items = [
      item({ key: 'c', savedAt: '2026-12-01T12:00:00Z' }),
      item({ key: 'r', state: 'refused' }),
      item({ key: 'n', state: 'not-member' }),
      item({ key: 'a', savedAt: '2026-12-01T09:00:00Z', state: 'sign-in' }),
      item({ key: 'b', savedAt: '2026-12-01T11:00:00Z', state: 'sending' }),
    ];
    expect(sendable(items).map((i) => i.key)).toEqual(['a', 'b', 'c']);
  });

  test('every state has a word and a shape, not only a colour', () => {
    for (const look of Object.values(STATE_LOOK)) {
      expect(look.word.length).toBeGreaterThan(3);
      expect(look.shape.length).toBeGreaterThan(0);
    }
    expect(new Set(Object.values(STATE_LOOK).map((l) => l.word)).size).toBe(Object.keys(STATE_LOOK).length);
  });

  test.each([
    ['drain-card', `/machines/${MACHINE}/drain-card?outbox=k-0001-abcd`],
    ['oil-change', `/machines/${MACHINE}/oil-change?outbox=k-0001-abcd`],
    ['wear-reading', `/machines/${MACHINE}/wear-parts/${PART}?outbox=k-0001-abcd`],
  ] as const)('a refused %s is edited on its own form', (kind, url) => {
    expect(editUrlOf(item({ kind, partId: PART }))).toBe(url);
  });

  test.each([
    ['drain-card', { bottleCode: 'K7M-Q4XH', odometer: '5,200' }, 'km', 'Bottle K7M-Q4XH, 5,200 km'],
    [
      'oil-change',
      { changedOn: '2026-12-02', odometer: '14000', saeGrade: '10W-40' },
      'mi',
      '2026-12-02 at 14000 mi, 10W-40',
    ],
    ['wear-reading', { measuredOn: '2026-12-02', odometer: '310' }, 'h', '2026-12-02 at 310 h'],
    ['drain-card', {}, 'km', 'Bottle (no code), ? km'],
  ] as const)('label of a %s', (kind, fields, unit, label) => {
    expect(labelOf(kind, fields, unit)).toBe(label);
  });
});
