import { describe, expect, test } from 'vitest';
import { isCacheablePage, markSavedCopy, savedCopySentence, SAVED_COPY_ATTRIBUTE } from '~/lib/offline/page-cache';

const ID = '33333333-3333-4333-8333-333333333333';

describe('isCacheablePage: the garage side is kept, accounts and one-off links are not', () => {
  test.each([
    ['/', true],
    ['/machines', true],
    ['/outbox', true],
    ['/samples', true],
    [`/machines/${ID}`, true],
    [`/machines/${ID}/drain-card`, true],
    [`/machines/${ID}/oil-change`, true],
    [`/machines/${ID}/wear-parts/${ID}`, true],
    [`/samples/${ID}`, true],
    [`/samples/${ID}/tag`, true],
    ['/sign-in', false],
    ['/sign-out', false],
    ['/account', false],
    ['/reset-password', false],
    ['/invitations/abc', false],
    ['/api/samples', false],
    ['/dev/mailbox', false],
    [`/machines/${ID}/edit`, false],
    ['/machines/new', false],
    ['/unsubscribe', false],
  ])('%s → %s', (path, kept) => {
    expect(isCacheablePage(path)).toBe(kept);
  });
});

describe('a saved copy says so', () => {
  test('the <html> element is marked with the time it was saved', () => {
    expect(markSavedCopy('<!doctype html><html lang="en"><body>', '2026-12-02T06:30:00.000Z')).toBe(
      `<!doctype html><html ${SAVED_COPY_ATTRIBUTE}="2026-12-02T06:30:00.000Z" lang="en"><body>`,
    );
  });

  test('a forged time cannot break out of the attribute', () => {
    expect(markSavedCopy('<html>', '"><script>x</script>')).toBe(`<html ${SAVED_COPY_ATTRIBUTE}="scriptxscript">`);
    expect(markSavedCopy('<html>', '')).toBe(`<html ${SAVED_COPY_ATTRIBUTE}="unknown">`);
  });

  test.each([
    ['2026-12-02T06:30:00.000Z', /^You are offline: showing what was saved at 2 Dec 2026, 06:30\./],
    ['not a time', /^You are offline: showing what was saved at an earlier visit\./],
  ])('sentence for %s', (at, sentence) => {
    expect(savedCopySentence(at, 'UTC')).toMatch(sentence);
  });
});
