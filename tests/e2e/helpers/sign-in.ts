// Signing in from e2e tests: through the real form in Chromium, or through the JSON endpoint for fetch.
import type { Page } from 'playwright-core';

/** Signs in through the sign-in form and waits for the redirect away from it. */
export async function signInAs(page: Page, email: string, password: string): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password').fill(password);
  await Promise.all([
    page.waitForURL((u) => !u.pathname.startsWith('/sign-in')),
    page.getByRole('button', { name: 'Sign in' }).click(),
  ]);
}

/** Signs in with fetch and returns a Cookie header value ("sumpwise_session=…") for later requests. */
export async function sessionCookieFor(baseUrl: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in as ${email} answered ${res.status}: ${await res.text()}`);
  const cookie = res.headers.getSetCookie().find((c) => c.startsWith('sumpwise_session='));
  if (!cookie) throw new Error('sign-in set no session cookie');
  return cookie.split(';')[0]!;
}
