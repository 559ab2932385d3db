// The drain card's offline queue, kept in localStorage: a card whose sending fails for lack of a
// connection waits here and is sent when the browser is online again. Each card carries a client key the
// server remembers, so a card is never registered twice even if a reply is lost on the way back.

export const QUEUE_KEY = 'sumpwise.drainCards.v1';

export interface QueuedCard {
  clientKey: string;
  machineId: string;
  machineName: string;
  body: Record<string, string>;
  savedAt: string;
  /** Set when the server refused the card (nothing was written); the rider must reopen it. */
  refused?: string;
}

/** The cards waiting on this device. */
export function readQueue(storage: Storage): QueuedCard[] {
  try {
    const raw = storage.getItem(QUEUE_KEY);
    const parsed: unknown = raw ? JSON.parse(raw) : [];
    return Array.isArray(parsed) ? (parsed as QueuedCard[]) : [];
  } catch {
    return [];
  }
}

/** Adds or replaces a card (by client key). */
export function enqueueCard(storage: Storage, card: QueuedCard): void {
  const rest = readQueue(storage).filter((c) => c.clientKey !== card.clientKey);
  storage.setItem(QUEUE_KEY, JSON.stringify([...rest, card]));
}

/** Removes a card once the server has it. */
export function dropCard(storage: Storage, clientKey: string): void {
  storage.setItem(QUEUE_KEY, JSON.stringify(readQueue(storage).filter((c) => c.clientKey !== clientKey)));
}

export type SendOutcome =
  | { kind: 'sent'; sampleId: string }
  | { kind: 'refused'; message: string; fields: Record<string, string> }
  | { kind: 'offline' };

/** Sends one card to the server; a network failure or a 5xx means "try again later". */
export async function sendCard(card: QueuedCard, fetchImpl: typeof fetch = fetch): Promise<SendOutcome> {
  let res: Response;
  try {
    res = await fetchImpl('/api/samples', {
      method: 'POST',
      headers: { 'content-type': 'application/json', accept: 'application/json' },
      credentials: 'same-origin',
      body: JSON.stringify({ ...card.body, machineId: card.machineId, clientKey: card.clientKey }),
    });
  } catch {
    return { kind: 'offline' };
  }
  if (res.status >= 500 || res.status === 408 || res.status === 429) return { kind: 'offline' };
  const body = (await res.json().catch(() => ({}))) as { sample?: { id: string }; error?: { message: string; fields?: Record<string, string> } };
  if (res.ok && body.sample) return { kind: 'sent', sampleId: body.sample.id };
  return { kind: 'refused', message: body.error?.message ?? `The server answered ${res.status}.`, fields: body.error?.fields ?? {} };
}
