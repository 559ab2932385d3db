import { createServer, request as httpRequest, type IncomingMessage } from 'node:http';
import type { AddressInfo } from 'node:net';
import { describe, expect, test } from 'vitest';
import { isClientAbort, isDatabaseUnavailable } from '~/lib/http/unavailable';

/** The error Node's http server gives a handler reading a body whose client hung up halfway. */
async function realClientAbort(): Promise<unknown> {
  let caught: (e: unknown) => void = () => {};
  const failed = new Promise<unknown>((resolve) => (caught = resolve));
  const server = createServer((req: IncomingMessage) => {
    req.on('error', caught);
    req.resume();
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  const client = httpRequest({ port, host: '127.0.0.1', method: 'POST', headers: { 'content-length': '1000' } });
  client.on('error', () => {});
  client.write('only part of the body');
  setTimeout(() => client.destroy(), 50);
  const error = await failed;
  server.close();
  return error;
}

describe('a client that hangs up is not a database outage', () => {
  test('the error of a body cut off by its client', async () => {
    const error = await realClientAbort();
    expect(isClientAbort(error)).toBe(true);
    expect(isDatabaseUnavailable(error)).toBe(false);
  });

  test.each([
    // [what, error, client abort, database unavailable]
    [
      'the server shutting down (SQLSTATE 57P01)',
      Object.assign(new Error('terminating connection'), { code: '57P01' }),
      false,
      true,
    ],
    [
      'a refused connection',
      Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:5432'), { code: 'ECONNREFUSED' }),
      false,
      true,
    ],
    ['a database socket reset', Object.assign(new Error('read ECONNRESET'), { code: 'ECONNRESET' }), false, true],
    ['pg losing its connection', new Error('Connection terminated unexpectedly'), false, true],
    ['a bug', new TypeError('x is undefined'), false, false],
    ['a string thrown', 'aborted', false, false],
  ])('%s', (_what, error, abort, unavailable) => {
    expect(isClientAbort(error)).toBe(abort);
    expect(isDatabaseUnavailable(error)).toBe(unavailable);
  });
});
