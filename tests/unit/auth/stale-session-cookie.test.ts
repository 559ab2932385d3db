// Which requests may clear a session cookie that matches no session. Sec-Fetch-Mode values from the W3C
// Fetch Metadata Request Headers draft and the WHATWG Fetch standard's request modes.
import { describe, expect, test } from 'vitest';
import { mayClearStaleSessionCookie } from '~/lib/auth/session';

describe('mayClearStaleSessionCookie', () => {
  test.each([
    ['a top-level navigation', { 'sec-fetch-mode': 'navigate' }, true],
    ['a client that sends no Fetch Metadata (curl, a script)', {}, true],
    ['a fetch() from the page', { 'sec-fetch-mode': 'cors' }, false],
    ['a same-origin fetch', { 'sec-fetch-mode': 'same-origin' }, false],
    ['an image or script load', { 'sec-fetch-mode': 'no-cors' }, false],
    ['a WebSocket', { 'sec-fetch-mode': 'websocket' }, false],
  ] as const)('%s → %s', (_name, headers, expected) => {
    expect(mayClearStaleSessionCookie(new Headers(headers))).toBe(expected);
  });
});
