// Which pages the service worker keeps a copy of, and how a saved copy says it is one. Pure functions,
// shared by the service worker, the pages and the tests.

import { formatMoment, runtimeTimeZone } from '../words/dates';

export const PAGE_CACHE = 'sumpwise-pages';
/** Set on each kept copy: when it was saved. */
export const SAVED_AT_HEADER = 'x-sumpwise-saved-at';
/** The attribute a saved copy's <html> carries, holding the time it was saved. */
export const SAVED_COPY_ATTRIBUTE = 'data-saved-copy';

/**
 * Pages worth keeping: the garage side a rider needs with no signal. Not the sign-in and account pages,
 * not one-off links (invitations, resets, unsubscribes), not downloads or developer pages.
 */
export function isCacheablePage(pathname: string): boolean {
  if (pathname === '/' || pathname === '/machines' || pathname === '/samples' || pathname === '/outbox') return true;
  return (
    /^\/machines\/[0-9a-f-]{36}(\/(drain-card|oil-change|history|wear-parts\/[0-9a-f-]{36}))?$/.test(pathname) ||
    /^\/samples\/[0-9a-f-]{36}(\/tag)?$/.test(pathname)
  );
}

/** Marks a saved page's HTML as a saved copy (the page script shows "offline: showing what was saved at …"). */
export function markSavedCopy(html: string, savedAt: string): string {
  const safe = savedAt.replace(/[^0-9A-Za-z:.\-+]/g, '');
  return html.replace(/<html\b/i, `<html ${SAVED_COPY_ATTRIBUTE}="${safe || 'unknown'}"`);
}

/** The sentence a saved copy shows. */
export function savedCopySentence(savedAt: string, timeZone: string = runtimeTimeZone()): string {
  const d = new Date(savedAt);
  const when = Number.isNaN(d.getTime()) ? 'an earlier visit' : formatMoment(d, timeZone);
  return `You are offline: showing what was saved at ${when}. What you save now is kept on this device and sent when the network returns.`;
}
