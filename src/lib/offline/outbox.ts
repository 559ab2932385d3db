// The device's outbox: writes made without a network (drain cards, oil changes with their photos,
// wear-part measurements) wait here until they can be sent. This module holds the rules only (which
// request a queued write becomes, what an answer means, whether the current session may send it, how its
// state reads); the browser side keeps the items in IndexedDB and sends them.

import type { Level } from '../levels';

export type OutboxKind = 'drain-card' | 'oil-change' | 'wear-reading';

/**
 * waiting: will be sent when the network returns · sending: on its way · refused: the server said no
 * (nothing was written) · sign-in: the session ended or another account is signed in · other-crew: written
 * in a crew the rider is not working in now · not-member: written in a crew the rider has left.
 */
export type OutboxState = 'waiting' | 'sending' | 'refused' | 'sign-in' | 'other-crew' | 'not-member';

export interface OutboxPhoto {
  name: string;
  type: string;
  blob: Blob;
}

export interface OutboxItem {
  /** The client key, sent with the write and stored by the server: a resend writes nothing twice. */
  key: string;
  kind: OutboxKind;
  userId: string;
  crewId: string;
  crewName: string;
  machineId: string;
  machineName: string;
  /** The wear part of a measurement. */
  partId?: string;
  /** What the rider recognises it by: "Bottle K7M-Q4XH", "Oil change at 14,000 mi". */
  label: string;
  fields: Record<string, string | string[]>;
  photos: OutboxPhoto[];
  savedAt: string;
  state: OutboxState;
  /** The server's sentence (refused), or why it waits. */
  message?: string;
  fieldErrors?: Record<string, string>;
  attempts: number;
  lastTriedAt?: string;
}

/** What the signed-in session looks like to the outbox (from GET /api/auth/me), or null when signed out. */
export interface OutboxSession {
  userId: string;
  crewId: string | null;
  crews: { crewId: string; crewName: string }[];
}

export interface OutboxRequest {
  url: string;
  /** JSON fields; for an oil change with photos the browser builds multipart from these and the photos. */
  json: Record<string, unknown>;
  multipart: boolean;
}

/** The request a queued write becomes. */
export function requestOf(item: OutboxItem): OutboxRequest {
  const json: Record<string, unknown> = { ...item.fields, clientKey: item.key };
  switch (item.kind) {
    case 'drain-card':
      return { url: '/api/samples', json: { ...json, machineId: item.machineId }, multipart: false };
    case 'oil-change':
      return {
        url: `/api/machines/${encodeURIComponent(item.machineId)}/oil-changes`,
        json,
        multipart: item.photos.length > 0,
      };
    case 'wear-reading':
      return { url: `/api/wear-parts/${encodeURIComponent(item.partId ?? '')}/measurements`, json, multipart: false };
  }
}

/** Where the rider reopens a queued write to edit it (the form prefilled from the item). */
export function editUrlOf(item: OutboxItem): string {
  const q = `?outbox=${encodeURIComponent(item.key)}`;
  const m = `/machines/${encodeURIComponent(item.machineId)}`;
  if (item.kind === 'drain-card') return `${m}/drain-card${q}`;
  if (item.kind === 'oil-change') return `${m}/oil-change${q}`;
  return `${m}/wear-parts/${encodeURIComponent(item.partId ?? '')}${q}`;
}

/** Where a sent write can be seen. */
export function resultUrlOf(item: OutboxItem, body: unknown): string {
  const b = (body ?? {}) as { sample?: { id?: string } };
  if (item.kind === 'drain-card' && b.sample?.id) return `/samples/${b.sample.id}`;
  if (item.kind === 'wear-reading') return `/machines/${item.machineId}/wear-parts/${item.partId ?? ''}`;
  return `/machines/${item.machineId}`;
}

export type SendVerdict =
  | { kind: 'sent'; url: string }
  | { kind: 'retry' }
  | {
      kind: 'hold';
      state: Exclude<OutboxState, 'waiting' | 'sending'>;
      message: string;
      fields?: Record<string, string>;
    };

const SIGN_IN = 'Your session has ended. Sign in again with the same account and it will be sent.';

/**
 * What an answer to a queued write means. A network failure, a server error or a busy server: try again
 * later (the client key makes a resend safe). 401: sign in again. A refusal keeps the server's sentence.
 */
export function judgeAnswer(item: OutboxItem, status: number | null, body: unknown): SendVerdict {
  if (status === null || status >= 500 || status === 408 || status === 429) return { kind: 'retry' };
  const b = (body ?? {}) as { error?: { code?: string; message?: string; fields?: Record<string, string> } };
  if (status >= 200 && status < 300) return { kind: 'sent', url: resultUrlOf(item, body) };
  if (status === 401) return { kind: 'hold', state: 'sign-in', message: SIGN_IN };
  const message = b.error?.message ?? `The server answered ${status}.`;
  if (b.error?.code === 'other_crew') return { kind: 'hold', state: 'other-crew', message };
  if (b.error?.code === 'not_a_member') return { kind: 'hold', state: 'not-member', message };
  const fields = b.error?.fields ?? {};
  // The sentence beside the field says most (e.g. which sample already has the bottle code).
  const first = Object.values(fields)[0];
  return {
    kind: 'hold',
    state: 'refused',
    message: first && first !== message ? `${message} ${first}` : message,
    fields,
  };
}

/**
 * Whether the current session may send an item: only under the account and crew it was written in. Signed
 * out or another account: wait for sign-in. Another crew of the same rider: wait for a switch. A crew the
 * rider left: kept with a sentence, never sent elsewhere.
 */
export function checkSession(
  item: OutboxItem,
  session: OutboxSession | null,
): { ok: true } | { ok: false; state: OutboxState; message: string } {
  if (!session) return { ok: false, state: 'sign-in', message: SIGN_IN };
  if (session.userId !== item.userId) {
    return {
      ok: false,
      state: 'sign-in',
      message: 'Saved under another account. Sign in with that account to send it.',
    };
  }
  if (!session.crews.some((c) => c.crewId === item.crewId)) {
    return {
      ok: false,
      state: 'not-member',
      message: `You are no longer a member of ${item.crewName}, so this cannot be sent. Copy what you need, then discard it.`,
    };
  }
  if (session.crewId !== item.crewId) {
    return {
      ok: false,
      state: 'other-crew',
      message: `Saved in ${item.crewName}. Switch to that crew and it will be sent.`,
    };
  }
  return { ok: true };
}

/** Items the outbox tries to send now: everything not refused and not left behind in a crew the rider left. */
export function sendable(items: readonly OutboxItem[]): OutboxItem[] {
  return items
    .filter((i) => i.state !== 'refused' && i.state !== 'not-member')
    .sort((a, b) => a.savedAt.localeCompare(b.savedAt));
}

/** The word, shape and tone each state is shown with (never colour alone). */
export const STATE_LOOK: Record<OutboxState, { word: string; shape: string; tone: Level }> = {
  waiting: { word: 'Waiting to send', shape: '◷', tone: 'watch' },
  sending: { word: 'Sending', shape: '↻', tone: 'watch' },
  refused: { word: 'Not accepted', shape: '✕', tone: 'act' },
  'sign-in': { word: 'Sign in to send', shape: '⚿', tone: 'watch' },
  'other-crew': { word: 'Switch crew to send', shape: '⇄', tone: 'watch' },
  'not-member': { word: 'Cannot be sent', shape: '✕', tone: 'act' },
};

/** The label a queued write is listed under (after its kind and machine). */
export function labelOf(kind: OutboxKind, fields: Record<string, string | string[]>, unit: string): string {
  const f = (name: string) => String(fields[name] ?? '').trim();
  const at = `${f('odometer') || '?'}${unit ? ` ${unit}` : ''}`;
  if (kind === 'drain-card') return `Bottle ${f('bottleCode') || '(no code)'}, ${at}`;
  if (kind === 'oil-change')
    return `${f('changedOn') || '(no date)'} at ${at}${f('saeGrade') ? `, ${f('saeGrade')}` : ''}`;
  return `${f('measuredOn') || '(no date)'} at ${at}`;
}
