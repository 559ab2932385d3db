import { gunzipSync } from 'node:zlib';
import { describe, expect, test } from 'vitest';
import { answerPreparedJson, prepareJson, preparedJsonBytes } from '~/lib/http/conditional-json';
import { createTrendAnswers } from '~/lib/trends/trend-answers';

const answerOf = (tag: string, chars: number) => prepareJson({ pad: 'x'.repeat(chars) }, `W/"${tag}"`);

describe('createTrendAnswers', () => {
  test('an answer is found by its tag only', () => {
    const answers = createTrendAnswers(1024 * 1024);
    const a = answerOf('a', 100);
    answers.keep(a);
    expect(answers.get('W/"a"')).toBe(a);
    expect(answers.get('W/"b"')).toBeUndefined();
    expect(answers.bytes).toBe(preparedJsonBytes(a));
  });

  test('the store never holds more than its bytes: the least recently used answer goes first', () => {
    // Each answer is about 2 × 1,011 bytes (its text in UTF-16); four fit in 9,000 bytes, five do not.
    const answers = createTrendAnswers(9000);
    const kept = ['a', 'b', 'c', 'd'].map((t) => answerOf(t, 1000));
    for (const a of kept) answers.keep(a);
    expect(answers.get('W/"a"')).toBe(kept[0]);
    answers.keep(answerOf('e', 1000));
    expect(answers.bytes).toBeLessThanOrEqual(9000);
    // 'a' was just used, so 'b' was the oldest.
    expect(answers.get('W/"b"')).toBeUndefined();
    for (const t of ['a', 'c', 'd', 'e']) expect(answers.get(`W/"${t}"`)).toBeDefined();
  });

  test('a store of 0 bytes (CHART_CACHE_MB=0) keeps nothing', () => {
    const answers = createTrendAnswers(0);
    answers.keep(answerOf('a', 10));
    expect(answers.get('W/"a"')).toBeUndefined();
    expect(answers.bytes).toBe(0);
  });

  test('an answer bigger than the whole store is not kept', () => {
    const answers = createTrendAnswers(1000);
    answers.keep(answerOf('big', 5000));
    expect(answers.get('W/"big"')).toBeUndefined();
    expect(answers.bytes).toBe(0);
  });

  test('kept again after its gzip is made, the answer counts the gzip too', async () => {
    const answers = createTrendAnswers(1024 * 1024);
    const a = answerOf('a', 4000);
    answers.keep(a);
    const before = answers.bytes;
    const res = await answerPreparedJson(new Request('http://x/', { headers: { 'accept-encoding': 'gzip' } }), a);
    expect(res.headers.get('content-encoding')).toBe('gzip');
    answers.keep(a);
    expect(answers.bytes).toBe(before + a.gzipped!.byteLength);
  });
});

describe('answerPreparedJson', () => {
  test('one prepared answer is gzipped once and sent whole every time', async () => {
    const prepared = prepareJson({ series: Array.from({ length: 400 }, (_, i) => i * 1.5) });
    const gz = () => new Request('http://x/', { headers: { 'accept-encoding': 'gzip' } });
    const first = new Uint8Array(await (await answerPreparedJson(gz(), prepared)).arrayBuffer());
    const kept = prepared.gzipped;
    expect(kept).toBeDefined();
    const second = new Uint8Array(await (await answerPreparedJson(gz(), prepared)).arrayBuffer());
    expect(prepared.gzipped).toBe(kept);
    expect(second).toEqual(first);
    expect(gunzipSync(second).toString('utf8')).toBe(prepared.body);
    const plain = await answerPreparedJson(new Request('http://x/'), prepared);
    expect(await plain.text()).toBe(prepared.body);
    const unchanged = await answerPreparedJson(
      new Request('http://x/', { headers: { 'if-none-match': prepared.etag } }),
      prepared,
    );
    expect(unchanged.status).toBe(304);
  });
});
