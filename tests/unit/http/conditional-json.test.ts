import { gunzipSync } from 'node:zlib';
import { describe, expect, test } from 'vitest';
import { acceptsGzip, conditionalJson, entityTagOf, ifNoneMatchMatches } from '~/lib/http/conditional-json';

// Header grammar and comparison rules: RFC 9110 §8.8.3 (entity tags, weak comparison), §13.1.2 (If-None-Match),
// §12.5.3 (Accept-Encoding with q-values).
describe('ifNoneMatchMatches', () => {
  const tag = 'W/"abc"';
  test.each([
    ['W/"abc"', true],
    ['"abc"', true],
    ['"x", W/"abc"', true],
    ['  W/"abc"  ', true],
    ['*', true],
    ['"abd"', false],
    ['W/abc', false],
    ['abc', false],
    ['"abc', false],
    ['', false],
    [null, false],
    [`"abc", ${'"x", '.repeat(2000)}`, false],
  ] as const)('%j → %s', (header, expected) => {
    expect(ifNoneMatchMatches(header, tag)).toBe(expected);
  });
});

describe('acceptsGzip', () => {
  test.each([
    ['gzip', true],
    ['gzip, deflate, br', true],
    ['br;q=1.0, gzip;q=0.8, *;q=0.1', true],
    ['GZIP', true],
    ['x-gzip', true],
    ['*', true],
    ['gzip;q=0', false],
    ['gzip;q=0.000', false],
    ['*;q=0', false],
    ['*, gzip;q=0', false],
    ['identity', false],
    ['br, deflate', false],
    ['', false],
    [null, false],
    ['gzip;q=banana', true],
  ] as const)('%j → %s', (header, expected) => {
    expect(acceptsGzip(header)).toBe(expected);
  });
});

describe('conditionalJson', () => {
  const data = { values: Array.from({ length: 500 }, (_, i) => i) };
  const req = (headers: Record<string, string>) => new Request('http://127.0.0.1/x', { headers });

  test('the same data gives the same weak tag, other data another', () => {
    expect(entityTagOf(JSON.stringify(data))).toBe(entityTagOf(JSON.stringify({ values: data.values })));
    expect(entityTagOf('{"a":1}')).not.toBe(entityTagOf('{"a":2}'));
    expect(entityTagOf('{}')).toMatch(/^W\/"[A-Za-z0-9_-]{32}"$/);
  });

  test('gzips when accepted and says so; the body is the same JSON', async () => {
    const res = await conditionalJson(req({ 'accept-encoding': 'gzip' }), data);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-encoding')).toBe('gzip');
    expect(JSON.parse(gunzipSync(new Uint8Array(await res.arrayBuffer())).toString('utf8'))).toEqual(data);
  });

  test('sends plain JSON when gzip is not accepted, and small bodies always plain', async () => {
    expect((await conditionalJson(req({}), data)).headers.get('content-encoding')).toBeNull();
    expect(
      (await conditionalJson(req({ 'accept-encoding': 'gzip' }), { a: 1 })).headers.get('content-encoding'),
    ).toBeNull();
  });

  test('answers 304 without a body to its own tag', async () => {
    const etag = (await conditionalJson(req({}), data)).headers.get('etag')!;
    const res = await conditionalJson(req({ 'if-none-match': etag }), data);
    expect(res.status).toBe(304);
    expect(res.body).toBeNull();
    expect(res.headers.get('etag')).toBe(etag);
  });
});
