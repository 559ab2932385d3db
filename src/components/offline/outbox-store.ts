// Where queued writes live on the device: IndexedDB through idb-keyval (photos stay Blobs). Every change
// is announced on a BroadcastChannel so open pages and the service worker redraw and never work from a
// stale copy.
import { createStore, del, get, set, values } from 'idb-keyval';
import type { OutboxItem } from '../../lib/offline/outbox';

const store = createStore('sumpwise-outbox', 'items');
export const OUTBOX_CHANNEL = 'sumpwise-outbox';

function announce(): void {
  try {
    const ch = new BroadcastChannel(OUTBOX_CHANNEL);
    ch.postMessage('changed');
    ch.close();
  } catch {
    // No BroadcastChannel: pages still redraw on their own events.
  }
}

/** Every queued write on this device, oldest first. */
export async function listOutbox(): Promise<OutboxItem[]> {
  const items = (await values<OutboxItem>(store)) ?? [];
  return items.sort((a, b) => a.savedAt.localeCompare(b.savedAt));
}

export function getOutboxItem(key: string): Promise<OutboxItem | undefined> {
  return get<OutboxItem>(key, store);
}

/** Adds or replaces a queued write (by its client key). */
export async function putOutboxItem(item: OutboxItem): Promise<void> {
  await set(item.key, item, store);
  announce();
}

export async function removeOutboxItem(key: string): Promise<void> {
  await del(key, store);
  announce();
}

/** Calls back whenever any page or the service worker changed the outbox. */
export function onOutboxChange(callback: () => void): () => void {
  let ch: BroadcastChannel | null = null;
  try {
    ch = new BroadcastChannel(OUTBOX_CHANNEL);
    ch.onmessage = () => callback();
  } catch {
    ch = null;
  }
  return () => ch?.close();
}
