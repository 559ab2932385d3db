import { describe, expect, test } from 'vitest';
import type { Readable } from 'node:stream';
import { buffer } from 'node:stream/consumers';
import { withMultipartFile } from '~/lib/http/multipart-file';

const BOUNDARY = '----unit-boundary';

function part(name: string, body: string | Buffer, fileName?: string, type = 'application/octet-stream'): Buffer {
  const disposition =
    fileName === undefined ? `form-data; name="${name}"` : `form-data; name="${name}"; filename="${fileName}"`;
  return Buffer.concat([
    Buffer.from(`--${BOUNDARY}\r\ncontent-disposition: ${disposition}\r\ncontent-type: ${type}\r\n\r\n`),
    Buffer.from(body),
    Buffer.from('\r\n'),
  ]);
}
const end = Buffer.from(`--${BOUNDARY}--\r\n`);

/** A request whose body arrives as a stream with no length (chunked), in pieces of `chunk` bytes. */
function chunkedRequest(body: Buffer, chunk = 1000, type = `multipart/form-data; boundary=${BOUNDARY}`): Request {
  let at = 0;
  const stream = new ReadableStream<Uint8Array>({
    pull(c) {
      if (at >= body.byteLength) return c.close();
      c.enqueue(body.subarray(at, at + chunk));
      at += chunk;
    },
  });
  return new Request('http://local/', {
    method: 'POST',
    headers: { 'content-type': type },
    body: stream,
    duplex: 'half',
  } as RequestInit);
}

const readAll = async (file: Readable, name: string) => ({ name, bytes: await buffer(file) });

describe('withMultipartFile', () => {
  test('hands the named file on as a stream, chunk by chunk, and drops other files and fields', async () => {
    const photo = Buffer.alloc(50_000, 7);
    const body = Buffer.concat([
      part('caption', 'valve cover'),
      part('other', 'ignored bytes', 'o.bin'),
      part('file', photo, 'p.jpg', 'image/jpeg'),
      end,
    ]);
    const r = await withMultipartFile(
      chunkedRequest(body, 333),
      { field: 'file', maxBytes: 1_000_000, drainLimit: 2_000_000 },
      readAll,
    );
    if (!r.ok) throw new Error(r.reason);
    expect(r.value.name).toBe('p.jpg');
    expect(r.value.bytes.equals(photo)).toBe(true);
    expect(r.bodyBytes).toBe(body.byteLength);
  });

  test.each([
    {
      name: 'no file field at all',
      body: () => Buffer.concat([part('caption', 'x'), end]),
      type: undefined,
      reason: 'no-file',
    },
    {
      name: 'a plain form sent instead',
      body: () => Buffer.from('file=abc'),
      type: 'application/x-www-form-urlencoded',
      reason: 'invalid',
    },
    {
      name: 'a multipart type without a boundary',
      body: () => Buffer.concat([part('file', 'abc', 'a.png'), end]),
      type: 'multipart/form-data',
      reason: 'invalid',
    },
    {
      name: 'a chunked body past the drain limit',
      body: () => Buffer.concat([part('file', Buffer.alloc(300_000), 'big.jpg'), end]),
      type: undefined,
      reason: 'too-large',
    },
    // Garbage with no boundary in it, larger than a photo may be: the size is what the client needs to hear.
    {
      name: 'a chunked body of garbage past the size limit',
      body: () => Buffer.alloc(80_000, 0x41),
      type: undefined,
      reason: 'too-large',
    },
    { name: 'a small body of garbage', body: () => Buffer.alloc(8_000, 0x41), type: undefined, reason: 'invalid' },
  ])('$name: refused ($reason)', async ({ body, type, reason }) => {
    const r = await withMultipartFile(
      chunkedRequest(body(), 4096, type),
      { field: 'file', maxBytes: 50_000, drainLimit: 100_000 },
      readAll,
    );
    expect(r.ok ? 'ok' : r.reason).toBe(reason);
  });

  test('a declared length past the drain limit is refused before a byte is read', async () => {
    const req = new Request('http://local/', {
      method: 'POST',
      headers: { 'content-type': `multipart/form-data; boundary=${BOUNDARY}`, 'content-length': '99999999' },
      body: 'x',
    });
    const r = await withMultipartFile(req, { field: 'file', maxBytes: 500, drainLimit: 1000 }, readAll);
    expect(r).toEqual({ ok: false, reason: 'too-large', size: 99_999_999 });
  });

  test('a body cut off in the middle of the file is "invalid", and the reader sees its stream end with an error', async () => {
    const body = Buffer.concat([part('file', Buffer.alloc(20_000, 1), 'p.jpg')]).subarray(0, 10_000);
    let readerError: unknown = null;
    const r = await withMultipartFile(
      chunkedRequest(body, 1000),
      { field: 'file', maxBytes: 1_000_000, drainLimit: 2_000_000 },
      async (file) => {
        try {
          await buffer(file);
        } catch (e) {
          readerError = e;
        }
        return null;
      },
    );
    expect(r.ok ? 'ok' : r.reason).toBe('invalid');
    expect(readerError).toBeInstanceOf(Error);
  });
});
