// Progressive enhancement of the drain card: with JavaScript the card is sent as JSON and, if the
// connection drops, kept in this browser and sent when it returns. Without JavaScript the form posts as
// plain HTML. On the samples list the same island only sends whatever is waiting.
import { useCallback, useEffect, useRef, useState } from 'react';
import { dropCard, enqueueCard, readQueue, sendCard, type QueuedCard } from './drain-card-queue';

interface Props {
  /** 'card': take over the drain card form with this id; 'flush': only send waiting cards. */
  mode: 'card' | 'flush';
  formId?: string;
  machineId?: string;
  machineName?: string;
}

const RETRY_MS = 15_000;

export default function DrainCardQueue({ mode, formId, machineId, machineName }: Props) {
  const [waiting, setWaiting] = useState<QueuedCard[]>([]);
  const [status, setStatus] = useState('');
  const busy = useRef(false);

  const refresh = () => setWaiting(readQueue(window.localStorage));

  const flush = useCallback(async () => {
    if (busy.current) return;
    busy.current = true;
    try {
      for (const card of readQueue(window.localStorage).filter((c) => !c.refused)) {
        const out = await sendCard(card);
        if (out.kind === 'offline') break;
        if (out.kind === 'sent') {
          dropCard(window.localStorage, card.clientKey);
          setStatus(`Bottle ${card.body['bottleCode'] ?? ''} of ${card.machineName} is registered.`);
          // The card still on screen has gone through: show its sample, as a direct send would.
          const onScreen = formId ? (document.getElementById(formId) as HTMLFormElement | null)?.elements.namedItem('clientKey') : null;
          if (onScreen instanceof HTMLInputElement && onScreen.value === card.clientKey) {
            window.location.assign(`/samples/${out.sampleId}?registered=1`);
            return;
          }
        } else {
          enqueueCard(window.localStorage, { ...card, refused: Object.values(out.fields)[0] ?? out.message });
        }
      }
    } finally {
      busy.current = false;
      refresh();
    }
  }, [formId]);

  useEffect(() => {
    refresh();
    void flush();
    const online = () => void flush();
    window.addEventListener('online', online);
    const timer = window.setInterval(() => { if (navigator.onLine) void flush(); }, RETRY_MS);
    return () => { window.removeEventListener('online', online); window.clearInterval(timer); };
  }, [flush]);

  useEffect(() => {
    if (mode !== 'card' || !formId || !machineId) return;
    const form = document.getElementById(formId) as HTMLFormElement | null;
    if (!form) return;
    const onSubmit = async (e: SubmitEvent) => {
      const submitter = e.submitter as HTMLButtonElement | null;
      if (submitter?.name === 'action' && submitter.value === 'issue') return; // plain post: issue a code
      e.preventDefault();
      const data = new FormData(form);
      const body: Record<string, string> = {};
      for (const [k, v] of data.entries()) if (typeof v === 'string' && k !== 'action') body[k] = v;
      const card: QueuedCard = { clientKey: body['clientKey'] ?? crypto.randomUUID(), machineId, machineName: machineName ?? '', body, savedAt: new Date().toISOString() };
      // Kept before sending, so a page closed mid-request still has the card.
      enqueueCard(window.localStorage, card);
      setStatus('Sending…');
      const out = await sendCard(card);
      if (out.kind === 'sent') {
        dropCard(window.localStorage, card.clientKey);
        window.location.assign(`/samples/${out.sampleId}?registered=1`);
      } else if (out.kind === 'refused') {
        // Nothing was written: let the server show its messages beside the fields.
        dropCard(window.localStorage, card.clientKey);
        form.submit();
      } else {
        setStatus('No connection. The card is kept on this phone and will be sent when the connection returns — it will not be registered twice.');
        refresh();
      }
    };
    form.addEventListener('submit', onSubmit);
    return () => form.removeEventListener('submit', onSubmit);
  }, [mode, formId, machineId, machineName]);

  const pending = waiting.filter((c) => !c.refused);
  const refused = waiting.filter((c) => c.refused);
  if (!status && waiting.length === 0) return null;
  return (
    <div className="caution mt-3" role="status" aria-live="polite" data-testid="drain-card-queue">
      {status && <p className="font-semibold">{status}</p>}
      {pending.length > 0 && (
        <p>{pending.length} drain card(s) waiting to be sent: {pending.map((c) => `${c.body['bottleCode'] ?? '?'} (${c.machineName})`).join(', ')}.</p>
      )}
      {refused.map((c) => (
        <p key={c.clientKey}>
          Card {c.body['bottleCode']} ({c.machineName}) was not accepted: {c.refused}{' '}
          <button type="button" className="btn-quiet" onClick={() => { dropCard(window.localStorage, c.clientKey); refresh(); }}>Dismiss</button>
        </p>
      ))}
    </div>
  );
}
