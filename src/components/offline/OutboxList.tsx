// The "waiting to send" list: every write kept on this device, with its state in word, shape and colour,
// the server's sentence when it was not accepted, and what the rider can do (send now, edit, discard).
import { useCallback, useEffect, useState } from 'react';
import { STATE_LOOK, editUrlOf, type OutboxItem, type OutboxKind } from '~/lib/offline/outbox';
import { listOutbox, onOutboxChange, removeOutboxItem } from './outbox-store';
import { flushOutbox, type FlushReport } from './outbox-sync';
import { formatCount } from '~/lib/words/words';
import { formatMoment, runtimeTimeZone } from '~/lib/words/dates';
import type { Level } from '~/lib/levels';

interface Props {
  /** Only this kind of write (the drain card shows its cards); all kinds when absent. */
  kind?: OutboxKind;
  /** Show the heading and the empty state (the full page), or nothing when empty (beside a form). */
  full?: boolean;
  /** The reader's time zone (the account's); this device's when absent. */
  timeZone?: string | null;
}

const TONE: Record<Level, string> = {
  steady: 'bg-level-steady-bg text-level-steady border-level-steady',
  watch: 'bg-level-watch-bg text-level-watch border-level-watch',
  act: 'bg-level-act-bg text-level-act border-level-act',
};

const KIND_WORD: Record<OutboxKind, string> = {
  'drain-card': 'Drain card',
  'oil-change': 'Oil change',
  'wear-reading': 'Wear-part measurement',
};

/** When an entry was saved, in the reader's zone (the account's when the page passes it, else this device's). */
function formatTime(iso: string, timeZone: string): string {
  return formatMoment(new Date(iso), timeZone);
}

export default function OutboxList({ kind, full = false, timeZone }: Props) {
  const zone = timeZone || runtimeTimeZone();
  const [items, setItems] = useState<OutboxItem[] | null>(null);
  const [online, setOnline] = useState(true);
  const [status, setStatus] = useState('');
  const [busy, setBusy] = useState(false);

  const refresh = useCallback(async () => {
    const all = await listOutbox();
    setItems(kind ? all.filter((i) => i.kind === kind) : all);
  }, [kind]);

  useEffect(() => {
    setOnline(navigator.onLine);
    void refresh();
    const stop = onOutboxChange(() => void refresh());
    const on = () => setOnline(true);
    const off = () => setOnline(false);
    window.addEventListener('online', on);
    window.addEventListener('offline', off);
    return () => {
      stop();
      window.removeEventListener('online', on);
      window.removeEventListener('offline', off);
    };
  }, [refresh]);

  const sendNow = async () => {
    setBusy(true);
    setStatus('Sending…');
    const report: FlushReport = await flushOutbox();
    setBusy(false);
    await refresh();
    setStatus(
      report.offline
        ? 'No connection yet. Everything stays on this device and is sent when the network returns.'
        : report.sent.length > 0
          ? `${report.sent.length} sent.`
          : 'Nothing could be sent; see each entry.',
    );
  };

  const discard = async (item: OutboxItem) => {
    if (!window.confirm(`Discard “${item.label}”? It was not written to Sumpwise and will be gone from this device.`))
      return;
    await removeOutboxItem(item.key);
    setStatus(`“${item.label}” was discarded.`);
  };

  if (items === null)
    return full ? (
      <p className="mt-4 text-ink-soft" data-outbox-list>
        Reading what this device keeps…
      </p>
    ) : null;
  if (items.length === 0 && !full && !status) return null;
  return (
    <section
      className={full ? 'mt-4' : 'mt-4 rounded-card border-2 border-line bg-paper-raised p-3'}
      aria-labelledby="outbox-heading"
      data-outbox-list
      data-testid="outbox-list"
    >
      <h2 id="outbox-heading" className={full ? 'text-xl' : 'text-lg'}>
        {full ? 'On this device' : 'Waiting to send'}
        {items.length > 0 ? ` (${items.length})` : ''}
      </h2>
      {!online && (
        <p className="mt-1 text-sm font-semibold" data-testid="outbox-offline">
          ◷ No network: what you save stays on this device until it returns.
        </p>
      )}
      <p className="mt-1 text-sm" role="status" aria-live="polite" data-testid="outbox-status">
        {status}
      </p>
      {items.length === 0 ? (
        <p className="mt-2 text-ink-soft">
          Nothing is waiting. Drain cards, oil changes and measurements saved without a network appear here until they
          are sent.
        </p>
      ) : (
        <ul className="mt-2 space-y-3">
          {items.map((item) => {
            const look = STATE_LOOK[item.state];
            const canEdit = item.state === 'refused' || item.state === 'not-member';
            return (
              <li
                key={item.key}
                className="rounded-md border border-line bg-white p-3"
                data-testid="outbox-item"
                data-state={item.state}
              >
                <div className="flex flex-wrap items-center justify-between gap-2">
                  <p className="font-semibold">
                    {KIND_WORD[item.kind]} · {item.machineName}
                  </p>
                  <span
                    className={`inline-flex items-center gap-1.5 rounded-full border-2 px-3 py-1 text-sm font-bold ${TONE[look.tone]}`}
                  >
                    <span aria-hidden="true">{look.shape}</span>
                    {look.word}
                  </span>
                </div>
                <p className="text-sm">
                  {item.label}
                  {item.photos.length > 0 ? ` · ${formatCount(item.photos.length, 'photo')}` : ''}
                </p>
                <p className="text-xs text-ink-soft">
                  Saved{' '}
                  <time dateTime={item.savedAt} className="whitespace-nowrap">
                    {formatTime(item.savedAt, zone)}
                  </time>{' '}
                  in {item.crewName}
                  {item.attempts > 0 && item.lastTriedAt
                    ? ` · tried ${item.attempts}×, last ${formatTime(item.lastTriedAt, zone)}`
                    : ''}
                </p>
                {item.message && (
                  <p
                    className={`mt-1 text-sm ${item.state === 'refused' || item.state === 'not-member' ? 'field-error' : ''}`}
                    data-testid="outbox-message"
                  >
                    {item.state === 'refused' ? '✕ ' : ''}
                    {item.message}
                  </p>
                )}
                {canEdit && (
                  <div className="mt-2 flex flex-wrap gap-2">
                    {item.state === 'refused' && (
                      <a className="btn-secondary" href={editUrlOf(item)}>
                        Edit and send again
                      </a>
                    )}
                    <button type="button" className="btn-quiet" onClick={() => void discard(item)}>
                      Discard
                    </button>
                  </div>
                )}
                {item.state === 'sign-in' && (
                  <a className="btn-quiet mt-2" href={`/sign-in?next=${encodeURIComponent('/outbox')}`}>
                    Sign in
                  </a>
                )}
              </li>
            );
          })}
        </ul>
      )}
      {items.some((i) => i.state !== 'refused' && i.state !== 'not-member') && (
        <button type="button" className="btn-primary mt-3" onClick={() => void sendNow()} disabled={busy}>
          Send now
        </button>
      )}
    </section>
  );
}
