// This device's identity and its block of reserved Sumpwise bottle codes, kept in IndexedDB so a code can
// be issued with no signal. The block belongs to one rider in one crew; a code is dropped from it as soon
// as it is put on a card, so it is never handed out twice from this device (the server never reserves a
// code twice across devices).
import { createStore, get, set, update } from 'idb-keyval';
import { discardBody } from './discard-body';

const store = createStore('sumpwise-device', 'values');

export interface CodeBlock {
  userId: string;
  crewId: string;
  codes: { code: string; display: string }[];
  fetchedAt: string;
}

/** A random key for this browser profile, made once. */
export async function deviceKey(): Promise<string> {
  const known = await get<string>('deviceKey', store);
  if (known) return known;
  const key = crypto.randomUUID();
  await set('deviceKey', key, store);
  return key;
}

const blockKey = (userId: string, crewId: string) => `codes:${userId}:${crewId}`;

/** Fetches this device's block from the server (topped up) and keeps it; quietly keeps the old one offline. */
export async function refreshCodeBlock(userId: string, crewId: string): Promise<CodeBlock | undefined> {
  try {
    const res = await fetch('/api/samples/reserved-codes', {
      method: 'POST',
      credentials: 'same-origin',
      headers: { 'content-type': 'application/json', accept: 'application/json' },
      body: JSON.stringify({ deviceKey: await deviceKey() }),
    });
    if (res.ok) {
      const body = (await res.json()) as { crewId: string; codes: CodeBlock['codes'] };
      if (body.crewId === crewId) {
        const block: CodeBlock = { userId, crewId, codes: body.codes, fetchedAt: new Date().toISOString() };
        await set(blockKey(userId, crewId), block, store);
        return block;
      }
    } else discardBody(res);
  } catch {
    // Offline: use what is kept.
  }
  return get<CodeBlock>(blockKey(userId, crewId), store);
}

export function readCodeBlock(userId: string, crewId: string): Promise<CodeBlock | undefined> {
  return get<CodeBlock>(blockKey(userId, crewId), store);
}

/** Takes the next reserved code off the block (null when none is left). */
export async function takeReservedCode(
  userId: string,
  crewId: string,
): Promise<{ code: string; display: string } | null> {
  let taken: { code: string; display: string } | null = null;
  await update<CodeBlock | undefined>(
    blockKey(userId, crewId),
    (block) => {
      if (!block || block.codes.length === 0) return block;
      taken = block.codes[0]!;
      return { ...block, codes: block.codes.slice(1) };
    },
    store,
  );
  return taken;
}
