// Makes a garage form work with no network. On save the write is first kept on this device (IndexedDB,
// photos as Blobs) under a fresh client key, then sent; with no network it waits in the outbox and is
// sent when the network returns, never twice. Online, a refusal shows the server's messages beside the
// fields as before. On the drain card it also issues a bottle code from this device's reserved block and
// shows the bottle tag (with its QR code) without a network. Without JavaScript the form posts as plain HTML.
import { useCallback, useEffect, useRef, useState } from 'react';
import { labelOf, type OutboxItem, type OutboxKind, type OutboxPhoto } from '~/lib/offline/outbox';
import { takeReservedCode } from './device';
import { COLLECT_PHOTOS_EVENT, PHOTOS_KEPT_EVENT } from './offline-events';
import OutboxList from './OutboxList';
import { getOutboxItem, putOutboxItem, removeOutboxItem } from './outbox-store';
import { flushOutbox, requestBackgroundSync } from './outbox-sync';
import { formatCount } from '~/lib/words/words';
import { formatDay } from '~/lib/words/dates';

interface Props {
  kind: OutboxKind;
  formId: string;
  machineId: string;
  machineName: string;
  partId?: string;
  /** The machine's meter unit (mi, km, h), for the label in the list. */
  unit: string;
  /** The reader's time zone, for the times in the outbox list. */
  timeZone?: string | null;
}

const SUCCESS_QUERY: Record<OutboxKind, string> = {
  'drain-card': '?registered=1',
  'oil-change': '?logged=1',
  'wear-reading': '?measured=1',
};

function fieldsOf(form: HTMLFormElement): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {};
  for (const [k, v] of new FormData(form).entries()) {
    if (typeof v !== 'string' || k === 'action') continue;
    const had = out[k];
    out[k] = had === undefined ? v : Array.isArray(had) ? [...had, v] : [had, v];
  }
  return out;
}

function setClientKey(form: HTMLFormElement, key: string): void {
  let input = form.elements.namedItem('clientKey') as HTMLInputElement | null;
  if (!input) {
    input = document.createElement('input');
    input.type = 'hidden';
    input.name = 'clientKey';
    form.prepend(input);
  }
  input.value = key;
}

function fillForm(form: HTMLFormElement, fields: Record<string, string | string[]>): void {
  for (const el of Array.from(form.elements)) {
    if (
      !(el instanceof HTMLInputElement || el instanceof HTMLTextAreaElement || el instanceof HTMLSelectElement) ||
      !el.name ||
      el.name === 'clientKey'
    )
      continue;
    const v = fields[el.name];
    if (el instanceof HTMLInputElement && (el.type === 'checkbox' || el.type === 'radio')) {
      const vals = Array.isArray(v) ? v : v === undefined ? [] : [v];
      el.checked = vals.includes(el.value);
    } else if (!(el instanceof HTMLInputElement && (el.type === 'file' || el.type === 'hidden')) && v !== undefined) {
      el.value = Array.isArray(v) ? v.join('\n') : v;
    }
  }
  form.querySelector<HTMLInputElement>('input[name=odometer]')?.dispatchEvent(new Event('input', { bubbles: true }));
}

/** Shows refusal messages beside the fields (used when the page cannot re-post the form, e.g. photos held here). */
function showFieldErrors(form: HTMLFormElement, fields: Record<string, string>): void {
  form.querySelectorAll('[data-client-error]').forEach((n) => n.remove());
  for (const [name, message] of Object.entries(fields)) {
    const el = form.elements.namedItem(name);
    const anchor = el instanceof RadioNodeList ? (el[0] as HTMLElement | undefined) : (el as HTMLElement | null);
    const target = anchor?.closest('.field') ?? form.querySelector('[data-photo-fallback]')?.parentElement ?? form;
    const p = document.createElement('p');
    p.className = 'field-error';
    p.setAttribute('role', 'alert');
    p.dataset['clientError'] = '';
    p.textContent = `✕ ${message}`;
    target.append(p);
    if (anchor) anchor.setAttribute('aria-invalid', 'true');
  }
}

export default function OfflineForm({ kind, formId, machineId, machineName, partId, unit, timeZone }: Props) {
  const [status, setStatus] = useState('');
  const [editing, setEditing] = useState<OutboxItem | null>(null);
  const [tagCode, setTagCode] = useState<string | null>(null);
  const keptPhotos = useRef<OutboxPhoto[]>([]);

  const form = useCallback(() => document.getElementById(formId) as HTMLFormElement | null, [formId]);

  useEffect(() => {
    const f = form();
    if (!f) return;
    // A fresh key on every load: a page served from the device's saved copy must not reuse the key of an earlier card.
    setClientKey(f, crypto.randomUUID());
    const editKey = new URLSearchParams(window.location.search).get('outbox');
    if (editKey) {
      void getOutboxItem(editKey).then((item) => {
        if (!item || item.kind !== kind) return;
        fillForm(f, item.fields);
        setClientKey(f, item.key);
        keptPhotos.current = item.photos;
        setEditing(item);
      });
    }
  }, [form, kind]);

  const queued = useCallback(
    async (item: OutboxItem, why?: string) => {
      window.dispatchEvent(new CustomEvent(PHOTOS_KEPT_EVENT));
      keptPhotos.current = [];
      setEditing(null);
      const f = form();
      if (f) {
        setClientKey(f, crypto.randomUUID());
        if (kind === 'drain-card') {
          const code = f.elements.namedItem('bottleCode') as HTMLInputElement | null;
          if (code) code.value = '';
        }
      }
      setStatus(why ?? `Saved on this device: ${item.label}. It is sent when the network returns, and never twice.`);
      await requestBackgroundSync();
    },
    [form, kind],
  );

  useEffect(() => {
    const f = form();
    if (!f) return;
    const session = document.body.dataset;
    const onSubmit = async (e: SubmitEvent) => {
      const submitter = e.submitter as HTMLButtonElement | null;
      // Decided before any await: a submit event cannot be cancelled later.
      e.preventDefault();
      if (submitter?.name === 'action' && submitter.value === 'issue') {
        const code =
          session['user'] && session['crew'] ? await takeReservedCode(session['user'], session['crew']) : null;
        if (code) {
          (f.elements.namedItem('bottleCode') as HTMLInputElement).value = code.display;
          const issued = f.querySelector<HTMLInputElement>('input[name=codeSource][value=issued]');
          if (issued) issued.checked = true;
          setTagCode(code.display);
          setStatus(`Bottle code ${code.display} is yours: write it on the bottle, or show the tag below.`);
        } else if (!navigator.onLine) {
          setStatus(
            'No reserved bottle codes are left on this device. Use the lab kit’s code, or issue one when the network returns.',
          );
        } else {
          // Online without a reserved code: the plain post issues one.
          const action = document.createElement('input');
          action.type = 'hidden';
          action.name = 'action';
          action.value = 'issue';
          f.append(action);
          f.submit();
        }
        return;
      }
      if (!session['user'] || !session['crew']) {
        f.submit();
        return;
      }
      const fields = fieldsOf(f);
      const key = String(fields['clientKey'] ?? crypto.randomUUID());
      delete fields['clientKey'];
      const fresh: OutboxPhoto[] = [];
      if (kind === 'oil-change') {
        window.dispatchEvent(new CustomEvent(COLLECT_PHOTOS_EVENT, { detail: fresh }));
        const input = f.querySelector<HTMLInputElement>('input[type=file][name=photos]');
        if (input && !input.disabled)
          for (const file of Array.from(input.files ?? []))
            fresh.push({ name: file.name, type: file.type, blob: file });
      }
      const photos = [...keptPhotos.current, ...fresh];
      const item: OutboxItem = {
        key,
        kind,
        userId: session['user'],
        crewId: session['crew'],
        crewName: session['crewName'] ?? '',
        machineId,
        machineName,
        partId,
        label: labelOf(kind, fields, unit),
        fields,
        photos,
        savedAt: new Date().toISOString(),
        state: 'waiting',
        attempts: 0,
      };
      // Kept before sending, so a page closed mid-request still has it.
      await putOutboxItem(item);
      if (!navigator.onLine) return queued(item);
      setStatus('Sending…');
      const report = await flushOutbox();
      const sent = report.sent.find((s) => s.item.key === key);
      if (sent) {
        window.dispatchEvent(new CustomEvent(PHOTOS_KEPT_EVENT));
        window.location.assign(sent.url + SUCCESS_QUERY[kind]);
        return;
      }
      const now = await getOutboxItem(key);
      if (!now) {
        // Another tab or the service worker sent it first.
        window.location.assign(kind === 'drain-card' ? '/samples' : `/machines/${machineId}`);
        return;
      }
      if (now.state === 'refused') {
        // Nothing was written: show the server's messages beside the fields, as a plain post would.
        await removeOutboxItem(key);
        if (photos.length === 0) {
          f.submit();
          return;
        }
        setStatus(now.message ?? 'Some fields need attention.');
        showFieldErrors(f, now.fieldErrors ?? {});
        return;
      }
      return queued(
        now,
        now.state === 'waiting' ? undefined : `Saved on this device: ${now.label}. ${now.message ?? ''}`,
      );
    };
    const listener = (e: Event) => void onSubmit(e as SubmitEvent);
    f.addEventListener('submit', listener);
    f.dataset['offlineForm'] = 'ready';
    return () => f.removeEventListener('submit', listener);
  }, [form, kind, machineId, machineName, partId, unit, queued]);

  return (
    <div>
      {editing && (
        <div className="caution mt-3" data-testid="outbox-editing">
          <p className="font-semibold">
            Editing a {kind === 'drain-card' ? 'drain card' : kind === 'oil-change' ? 'oil change' : 'measurement'} that
            was not accepted.
          </p>
          {editing.message && <p>✕ {editing.message}</p>}
          {editing.photos.length > 0 && (
            <p>
              {formatCount(editing.photos.length, 'photo')} saved with it {editing.photos.length === 1 ? 'is' : 'are'}{' '}
              kept.
            </p>
          )}
        </div>
      )}
      <p
        className={status ? 'caution mt-3 font-semibold' : 'sr-only'}
        role="status"
        aria-live="polite"
        data-testid="offline-form-status"
      >
        {status}
      </p>
      {tagCode && <OfflineTag code={tagCode} formId={formId} machineName={machineName} unit={unit} />}
      <OutboxList kind={kind} timeZone={timeZone} />
    </div>
  );
}

/** The bottle tag for a code issued on this device: printable, with a QR code that opens the sample once it is sent. */
function OfflineTag({
  code,
  formId,
  machineName,
  unit,
}: {
  code: string;
  formId: string;
  machineName: string;
  unit: string;
}) {
  const [open, setOpen] = useState(false);
  const [qr, setQr] = useState('');
  const [details, setDetails] = useState<Record<string, string>>({});
  const show = async () => {
    const f = document.getElementById(formId) as HTMLFormElement | null;
    const d: Record<string, string> = {};
    if (f) for (const [k, v] of new FormData(f).entries()) if (typeof v === 'string') d[k] = v;
    setDetails(d);
    setOpen(true);
    // Loaded only when a tag is shown, so the drain card stays light.
    const QRCode = (await import('qrcode')).default;
    const url = new URL(
      `/samples/by-code/${encodeURIComponent(code.replace(/-/g, ''))}`,
      window.location.origin,
    ).toString();
    setQr(await QRCode.toString(url, { type: 'svg', errorCorrectionLevel: 'M', margin: 1 }));
  };
  const printTag = () => {
    document.body.classList.add('printing-tag');
    window.addEventListener('afterprint', () => document.body.classList.remove('printing-tag'), { once: true });
    window.print();
  };
  return (
    <div className="mt-3">
      <button type="button" className="btn-secondary" onClick={() => void show()} aria-expanded={open}>
        Show bottle tag
      </button>
      {open && (
        <div
          className="mt-2 flex gap-3 rounded-md border-2 border-ink bg-white p-3 text-black"
          data-testid="offline-tag"
          data-print-tag
        >
          <div
            className="h-32 w-32 flex-none"
            aria-label={`QR code for bottle ${code}`}
            role="img"
            dangerouslySetInnerHTML={{ __html: qr }}
          />
          <div>
            <p className="font-mono text-2xl font-bold tracking-wider">{code}</p>
            <p>{machineName}</p>
            <p className="text-sm">
              Drawn {formatDay(details['drawnOn'] ?? '')}
              {details['odometer'] ? ` at ${details['odometer']} ${unit}` : ''}
              {details['saeGrade'] ? ` · ${details['saeGrade']}` : ''}
            </p>
            <button type="button" className="btn-quiet mt-1 print:hidden" onClick={printTag}>
              Print
            </button>
          </div>
        </div>
      )}
    </div>
  );
}
