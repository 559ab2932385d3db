import { describe, expect, test } from 'vitest';
import { dropCard, enqueueCard, readQueue, sendCard, QUEUE_KEY, type QueuedCard } from '~/components/drain-card/drain-card-queue';

/** A Storage kept in memory, as localStorage behaves. */
function memoryStorage(): Storage {
  const m = new Map<string, string>();
  return {
    get length() { return m.size; },
    clear: () => m.clear(),
    getItem: (k) => m.get(k) ?? null,
    key: (i) => [...m.keys()][i] ?? null,
    removeItem: (k) => { m.delete(k); },
    setItem: (k, v) => { m.set(k, String(v)); },
  };
}

const card = (clientKey: string, bottleCode = 'VL-1'): QueuedCard => ({
  clientKey, machineId: 'm1', machineName: 'Marten', body: { bottleCode, odometer: '100' }, savedAt: '2026-01-01T00:00:00Z',
});

describe('drain card queue', () => {
  test('a card is kept once per client key, and dropped when sent', () => {
    const s = memoryStorage();
    enqueueCard(s, card('key-aaaaaaaa'));
    enqueueCard(s, card('key-aaaaaaaa', 'VL-1 corrected'));
    enqueueCard(s, card('key-bbbbbbbb'));
    expect(readQueue(s).map((c) => [c.clientKey, c.body['bottleCode']])).toEqual([['key-aaaaaaaa', 'VL-1 corrected'], ['key-bbbbbbbb', 'VL-1']]);
    dropCard(s, 'key-aaaaaaaa');
    expect(readQueue(s).map((c) => c.clientKey)).toEqual(['key-bbbbbbbb']);
  });

  test('a damaged queue reads as empty instead of breaking the card', () => {
    const s = memoryStorage();
    s.setItem(QUEUE_KEY, '{not json');
    expect(readQueue(s)).toEqual([]);
  });

  test.each([
    { name: 'network failure', reply: () => Promise.reject(new TypeError('Failed to fetch')), kind: 'offline' },
    { name: 'server error', reply: () => Promise.resolve(new Response('oops', { status: 503 })), kind: 'offline' },
    { name: 'created', reply: () => Promise.resolve(Response.json({ sample: { id: 's1' } }, { status: 201 })), kind: 'sent' },
    { name: 'repeat of a card already registered', reply: () => Promise.resolve(Response.json({ sample: { id: 's1' }, repeated: true }, { status: 200 })), kind: 'sent' },
    { name: 'refused', reply: () => Promise.resolve(Response.json({ error: { code: 'duplicate_bottle_code', message: 'x', fields: { bottleCode: 'used' } } }, { status: 409 })), kind: 'refused' },
  ])('$name → $kind', async ({ reply, kind }) => {
    const sent: RequestInit[] = [];
    const fake = ((_url: string, init: RequestInit) => { sent.push(init); return reply(); }) as unknown as typeof fetch;
    const out = await sendCard(card('key-cccccccc'), fake);
    expect(out.kind).toBe(kind);
    // The client key travels with every send, so the server can answer a resend with the first sample.
    expect(JSON.parse(String(sent[0]!.body))).toMatchObject({ clientKey: 'key-cccccccc', machineId: 'm1', bottleCode: 'VL-1' });
  });
});
