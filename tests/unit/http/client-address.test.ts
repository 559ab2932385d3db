import { describe, expect, test } from 'vitest';
import { isLoopbackHost, normaliseIp, resolveClientAddress } from '~/lib/http/client-address';

describe('the client address a request counts under', () => {
  test.each([
    // socket, X-Forwarded-For, trusted proxies → address
    ['198.51.100.7', undefined, 0, '198.51.100.7'],
    ['198.51.100.7', '203.0.113.9', 0, '198.51.100.7'],
    ['::ffff:198.51.100.7', '203.0.113.9', 0, '198.51.100.7'],
    // One proxy (socket 10.0.0.2) appended what it saw; whatever the client wrote before stays ignored.
    ['10.0.0.2', '203.0.113.9', 1, '203.0.113.9'],
    ['10.0.0.2', 'forged-by-client, 203.0.113.9', 1, '203.0.113.9'],
    ['10.0.0.2', ['1.1.1.1', '203.0.113.9'], 1, '203.0.113.9'],
    // Two proxies: client → 10.0.0.1 → 10.0.0.2 → app.
    ['10.0.0.2', '192.0.2.66, 203.0.113.9, 10.0.0.1', 2, '203.0.113.9'],
    // A request that skipped the proxy has no forwarded entry: the socket is all there is.
    ['198.51.100.7', undefined, 1, '198.51.100.7'],
    // Garbage where an address should be falls back to the socket.
    ['10.0.0.2', 'x'.repeat(10_000), 1, '10.0.0.2'],
    ['10.0.0.2', '2001:DB8::1', 1, '2001:db8::1'],
  ] as const)('socket %s, forwarded %j, %d proxies → %s', (socket, xff, n, expected) => {
    expect(resolveClientAddress(socket, xff as string | string[] | undefined, n)).toBe(expected);
  });

  test.each([
    ['127.0.0.1', true],
    ['127.9.9.9', true],
    ['::1', true],
    ['[::1]', true],
    ['localhost', true],
    ['0.0.0.0', false],
    ['::', false],
    ['192.0.2.1', false],
    ['example.test', false],
  ])('loopback %s: %s', (host, loopback) => {
    expect(isLoopbackHost(host)).toBe(loopback);
  });

  test.each([
    ['1.2.3.4', '1.2.3.4'],
    [' 1.2.3.4 ', '1.2.3.4'],
    ['1.2.3', null],
    ['', null],
    [null, null],
  ])('normaliseIp(%j) = %j', (v, out) => {
    expect(normaliseIp(v)).toBe(out);
  });
});
