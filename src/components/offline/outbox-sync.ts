// Sends what waits in the outbox, one write at a time, oldest first. Runs in pages (on load, when the
// network returns, on "send now") and in the service worker (Background Sync). A Web Lock keeps two of
// them from sending at once; were both to send anyway, the client key makes the second send write nothing.
import {
  checkSession,
  judgeAnswer,
  requestOf,
  sendable,
  type OutboxItem,
  type OutboxSession,
} from '../../lib/offline/outbox';
import { listOutbox, putOutboxItem, removeOutboxItem } from './outbox-store';
import { discardBody } from './discard-body';

export const SYNC_TAG = 'sumpwise-outbox';
const CREW_HEADER = 'x-sumpwise-crew';

export interface FlushReport {
  sent: { item: OutboxItem; url: string }[];
  offline: boolean;
}

/** The signed-in session (null when signed out), or 'offline' when the server cannot be reached. */
export async function readSession(fetchImpl: typeof fetch = fetch): Promise<OutboxSession | null | 'offline'> {
  let res: Response;
  try {
    res = await fetchImpl('/api/auth/me', {
      headers: { accept: 'application/json' },
      credentials: 'same-origin',
      cache: 'no-store',
    });
  } catch {
    return 'offline';
  }
  if (!res.ok) discardBody(res);
  if (res.status === 401) return null;
  if (!res.ok) return 'offline';
  const body = (await res.json()) as {
    user: { id: string };
    crew: { crewId: string } | null;
    crews: { crewId: string; crewName: string }[];
  };
  return { userId: body.user.id, crewId: body.crew?.crewId ?? null, crews: body.crews };
}

/** Sends one item; answers the status and body, or null status when the network failed. */
async function post(item: OutboxItem, fetchImpl: typeof fetch): Promise<{ status: number | null; body: unknown }> {
  const req = requestOf(item);
  const headers: Record<string, string> = { accept: 'application/json', [CREW_HEADER]: item.crewId };
  let body: BodyInit;
  if (req.multipart) {
    const form = new FormData();
    for (const [k, v] of Object.entries(req.json)) {
      for (const one of Array.isArray(v) ? v : [v]) form.append(k, String(one));
    }
    for (const p of item.photos) form.append('photos', p.blob, p.name);
    body = form;
  } else {
    headers['content-type'] = 'application/json';
    body = JSON.stringify(req.json);
  }
  try {
    const res = await fetchImpl(req.url, { method: 'POST', headers, body, credentials: 'same-origin' });
    return { status: res.status, body: await res.json().catch(() => null) };
  } catch {
    return { status: null, body: null };
  }
}

async function flushNow(fetchImpl: typeof fetch): Promise<FlushReport> {
  const report: FlushReport = { sent: [], offline: false };
  const items = sendable(await listOutbox());
  if (items.length === 0) return report;
  const session = await readSession(fetchImpl);
  if (session === 'offline') return { ...report, offline: true };
  for (const item of items) {
    const allowed = checkSession(item, session);
    if (!allowed.ok) {
      if (item.state !== allowed.state || item.message !== allowed.message)
        await putOutboxItem({ ...item, state: allowed.state, message: allowed.message });
      continue;
    }
    const now = new Date().toISOString();
    await putOutboxItem({
      ...item,
      state: 'sending',
      message: undefined,
      attempts: item.attempts + 1,
      lastTriedAt: now,
    });
    const answer = await post(item, fetchImpl);
    const verdict = judgeAnswer(item, answer.status, answer.body);
    if (verdict.kind === 'sent') {
      await removeOutboxItem(item.key);
      report.sent.push({ item, url: verdict.url });
    } else if (verdict.kind === 'retry') {
      await putOutboxItem({
        ...item,
        state: 'waiting',
        attempts: item.attempts + 1,
        lastTriedAt: now,
        message: answer.status === null ? undefined : `The server answered ${answer.status}; it will be tried again.`,
      });
      report.offline = answer.status === null;
      break;
    } else {
      await putOutboxItem({
        ...item,
        state: verdict.state,
        message: verdict.message,
        fieldErrors: verdict.fields,
        attempts: item.attempts + 1,
        lastTriedAt: now,
      });
    }
  }
  return report;
}

/** Sends every sendable item under a lock; never throws (a failure leaves items waiting). */
export async function flushOutbox(fetchImpl: typeof fetch = fetch): Promise<FlushReport> {
  const locks = (globalThis.navigator as Navigator | undefined)?.locks;
  try {
    if (locks) return await locks.request('sumpwise-outbox', () => flushNow(fetchImpl));
    return await flushNow(fetchImpl);
  } catch {
    return { sent: [], offline: true };
  }
}

/** Asks the browser to send the outbox when the network returns, even with no page open (Background Sync, where the browser has it). */
export async function requestBackgroundSync(): Promise<void> {
  try {
    const reg = (await navigator.serviceWorker?.ready) as
      (ServiceWorkerRegistration & { sync?: { register(tag: string): Promise<void> } }) | undefined;
    await reg?.sync?.register(SYNC_TAG);
  } catch {
    // Not supported, or not allowed: the next visit or "send now" sends it.
  }
}
