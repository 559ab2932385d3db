import { describe, expect, test } from 'vitest';
import { DESKTOP, PHONE, baseUrl, newContext, screenshot, useBrowser } from './helpers/browser';

describe('home page and health', () => {
  const browser = useBrowser();

  test.each([
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ])('the home page renders at %s size without horizontal scrolling', async (name, viewport) => {
    const context = await newContext(browser(), viewport);
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    const response = await page.goto('/');
    expect(response?.status()).toBe(200);
    await expect(page.title()).resolves.toContain('Sumpwise');
    expect(await page.getByRole('heading', { level: 1 }).textContent()).toBeTruthy();
    // Levels are readable without colour: each badge carries its word.
    for (const word of ['Steady', 'Watch', 'Act'])
      await expect(page.locator(`[data-level] >> text=${word}`).first().isVisible()).resolves.toBe(true);
    const overflow = await page.evaluate(
      () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
    );
    expect(overflow).toBeLessThanOrEqual(0);
    await screenshot(page, `home-${name}`);
    expect(errors).toEqual([]);
    await context.close();
  });

  test('GET /api/health reports the version and a reachable database', async () => {
    const res = await fetch(`${baseUrl()}/api/health`);
    expect(res.status).toBe(200);
    const body = (await res.json()) as { status: string; version: string; database: { reachable: boolean } };
    expect(body.status).toBe('ok');
    expect(body.version).toMatch(/^\d+\.\d+\.\d+/);
    expect(body.database.reachable).toBe(true);
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
  });

  test("a cross-site form POST is refused (403); a mail provider's one-click unsubscribe POST is not", async () => {
    const crossSite = await fetch(`${baseUrl()}/sign-in`, {
      method: 'POST',
      redirect: 'manual',
      headers: { origin: 'https://evil.example', 'content-type': 'application/x-www-form-urlencoded' },
      body: 'email=a%40b.example&password=whatever-long',
    });
    expect(crossSite.status).toBe(403);
    // RFC 8058: the provider's server POSTs "List-Unsubscribe=One-Click" with no Origin and no cookies.
    // A bad token answers 400 from the app itself, proving the request got past the origin check.
    const oneClick = await fetch(`${baseUrl()}/api/unsubscribe?token=not-a-real-token`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: 'List-Unsubscribe=One-Click',
    });
    expect(oneClick.status).toBe(400);
    expect(((await oneClick.json()) as { error: { code: string } }).error.code).toBe('invalid_token');
  });
});
