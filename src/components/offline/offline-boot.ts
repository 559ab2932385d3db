/// <reference types="vite-plugin-pwa/vanillajs" />
// Loaded by every page (a bundled module, no framework): registers the service worker, announces a new
// version without swapping code under an open form, says when a page is a saved copy, keeps the signed-in
// crew's garage pages and a block of bottle codes on the device, and sends what waits in the outbox.
import { registerSW } from 'virtual:pwa-register';
import { PAGE_CACHE, SAVED_AT_HEADER, SAVED_COPY_ATTRIBUTE, savedCopySentence } from '~/lib/offline/page-cache';
import { labelOf, type OutboxItem } from '~/lib/offline/outbox';
import { readCodeBlock, refreshCodeBlock } from './device';
import { discardBody } from './discard-body';
import { listOutbox, onOutboxChange, putOutboxItem } from './outbox-store';
import { createOutboxRetry } from './outbox-retry';
import { flushOutbox } from './outbox-sync';

const WARM_EVERY_MS = 10 * 60 * 1000;
const CODES_LOW = 5;
const SESSION_KEY = 'sumpwise.session.v1';
const WARMED_KEY = 'sumpwise.warmedAt.v1';
const OLD_QUEUE_KEY = 'sumpwise.drainCards.v1';

const body = document.body.dataset;
const session = body['user']
  ? { userId: body['user'], crewId: body['crew'] ?? '', crewName: body['crewName'] ?? '', role: body['role'] ?? '' }
  : null;
const savedCopy = document.documentElement.getAttribute(SAVED_COPY_ATTRIBUTE);

function notice(id: string, html: string, tone: 'watch' | 'steady'): HTMLElement {
  let el = document.getElementById(id);
  if (!el) {
    el = document.createElement('div');
    el.id = id;
    el.setAttribute('role', 'status');
    el.className = tone === 'watch' ? 'caution mb-4' : 'mb-4 rounded-md border-2 border-steel-300 bg-steel-50 p-3';
    document.getElementById('main')?.prepend(el);
  }
  el.innerHTML = html;
  return el;
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

// 1. A saved copy says so, with the time it was saved.
if (savedCopy !== null) {
  notice(
    'saved-copy-notice',
    `<p class="font-semibold" data-testid="saved-copy"><span aria-hidden="true">◷</span> ${escapeHtml(savedCopySentence(savedCopy))}</p>`,
    'watch',
  );
}

// 2. A form the rider has typed into is never reloaded from under them.
const formSnapshots = new Map<HTMLFormElement, string>();
const snapshot = (f: HTMLFormElement) =>
  JSON.stringify([...new FormData(f).entries()].map(([k, v]) => [k, typeof v === 'string' ? v : v.name]));
for (const f of document.querySelectorAll<HTMLFormElement>('main form')) formSnapshots.set(f, snapshot(f));
const formIsDirty = () => [...formSnapshots].some(([f, s]) => document.contains(f) && snapshot(f) !== s);

const updateSW = registerSW({
  immediate: true,
  onNeedRefresh() {
    const el = notice(
      'update-notice',
      '<p class="font-semibold">A new version of Sumpwise is ready — reload to use it.</p><p class="text-sm">Nothing changes until you reload; finish or save what you are typing first.</p><button type="button" class="btn-secondary mt-2" data-reload>Reload</button>',
      'steady',
    );
    el.querySelector('[data-reload]')?.addEventListener('click', () => {
      if (
        formIsDirty() &&
        !window.confirm('This form has changes that are not saved yet. Reload anyway and lose them?')
      )
        return;
      void updateSW(true);
    });
  },
});

// 3. Whoever is signed in: a different account or crew must not see the last one's saved pages.
async function followSession(): Promise<void> {
  if (savedCopy !== null || !('caches' in window)) return;
  const now = session ? `${session.userId}:${session.crewId}` : '';
  const before = localStorage.getItem(SESSION_KEY);
  if (before !== null && before !== now) {
    await caches.delete(PAGE_CACHE);
    localStorage.removeItem(WARMED_KEY);
  }
  localStorage.setItem(SESSION_KEY, now);
}

// 4. Keep the crew's garage pages after one visit (not only the ones opened).
async function warmPages(): Promise<void> {
  if (!session || !navigator.onLine || savedCopy !== null || !('caches' in window)) return;
  const last = Number(localStorage.getItem(WARMED_KEY) ?? '0');
  if (Date.now() - last < WARM_EVERY_MS) return;
  const res = await fetch('/api/offline/pages', {
    headers: { accept: 'application/json' },
    credentials: 'same-origin',
  });
  if (!res.ok) return discardBody(res);
  const { crewId, pages } = (await res.json()) as { crewId: string; pages: string[] };
  if (crewId !== session.crewId) return;
  const cache = await caches.open(PAGE_CACHE);
  for (const url of pages) {
    const page = await fetch(url, { credentials: 'same-origin', headers: { accept: 'text/html' } }).catch(() => null);
    if (!page) continue;
    if (page.status !== 200 || page.redirected || !(page.headers.get('content-type') ?? '').includes('text/html')) {
      discardBody(page);
      continue;
    }
    const headers = new Headers(page.headers);
    headers.set(SAVED_AT_HEADER, new Date().toISOString());
    await cache.put(url, new Response(await page.blob(), { status: 200, headers }));
  }
  localStorage.setItem(WARMED_KEY, String(Date.now()));
}

// 5. Cards kept by the earlier drain-card queue (localStorage) move into the outbox once.
async function adoptOldQueue(): Promise<void> {
  const raw = localStorage.getItem(OLD_QUEUE_KEY);
  if (!raw || !session) return;
  try {
    const cards = JSON.parse(raw) as {
      clientKey: string;
      machineId: string;
      machineName: string;
      body: Record<string, string>;
      savedAt: string;
    }[];
    for (const c of Array.isArray(cards) ? cards : []) {
      const item: OutboxItem = {
        key: c.clientKey,
        kind: 'drain-card',
        userId: session.userId,
        crewId: session.crewId,
        crewName: session.crewName,
        machineId: c.machineId,
        machineName: c.machineName,
        label: labelOf('drain-card', c.body, ''),
        fields: c.body,
        photos: [],
        savedAt: c.savedAt,
        state: 'waiting',
        attempts: 0,
      };
      await putOutboxItem(item);
    }
  } catch {
    // An unreadable old queue is left as it is.
    return;
  }
  localStorage.removeItem(OLD_QUEUE_KEY);
}

// 6. What waits to be sent: a line on every page (the list itself is at /outbox) and a send on each chance.
async function showWaiting(): Promise<void> {
  if (document.querySelector('[data-outbox-list]')) return; // the page shows the whole list
  const items = await listOutbox();
  const existing = document.getElementById('outbox-notice');
  if (items.length === 0) {
    existing?.remove();
    return;
  }
  const held = items.filter((i) => i.state !== 'waiting' && i.state !== 'sending').length;
  notice(
    'outbox-notice',
    `<p><span aria-hidden="true">◷</span> <a href="/outbox" data-testid="outbox-link">${items.length} ${items.length === 1 ? 'write' : 'writes'} waiting to send</a>${held ? ` — ${held} ${held === 1 ? 'needs' : 'need'} you` : ''}.</p>`,
    'watch',
  );
}

// A browser that says it is offline fires 'online' when that changes; one that says online but cannot reach the
// server is tried again after a pause.
const retry = createOutboxRetry(async () => !navigator.onLine || !(await flushOutbox()).offline);

async function send(): Promise<void> {
  await retry.run();
}

async function start(): Promise<void> {
  await followSession();
  await adoptOldQueue();
  await showWaiting();
  onOutboxChange(() => void showWaiting());
  window.addEventListener('online', () => void send());
  await send();
  if (session && session.role !== 'mechanic' && navigator.onLine && savedCopy === null) {
    // Top the block of reserved bottle codes up when it runs low, not on every page.
    const block = await readCodeBlock(session.userId, session.crewId);
    if (!block || block.codes.length < CODES_LOW) await refreshCodeBlock(session.userId, session.crewId);
  }
  if ('serviceWorker' in navigator) {
    await navigator.serviceWorker.ready;
    await warmPages().catch(() => undefined);
  }
  document.documentElement.dataset['offlineReady'] = 'true';
}

void start();
