// Accounts end to end in Chromium against the built server, and attacks on the account routes by plain fetch.
import http from 'node:http';
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Browser } from 'playwright-core';
import type { Kysely } from 'kysely';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';
import { generateToken, hashToken } from '~/lib/auth/tokens';
import { makeMachine } from '../integration/factories';
import { DESKTOP, baseUrl, launchBrowser, newContext, screenshot } from './helpers/browser';
import { waitForMail } from './helpers/mailbox';
import { MATRIX_PASSWORD, MATRIX_USERS, ensureMatrixAccounts, type MatrixCrews } from './helpers/matrix-accounts';
import { sessionCookieFor, signInAs } from './helpers/sign-in';

const run = Date.now().toString(36);
let browser: Browser;
let db: Kysely<Database>;
let crews: MatrixCrews;

beforeAll(async () => {
  browser = await launchBrowser();
  db = createDb(inject('databaseUrl'), { max: 2 });
  crews = await ensureMatrixAccounts(db);
});
afterAll(async () => {
  await browser?.close();
  await db?.destroy();
});

const postJson = (path: string, body: unknown, headers: Record<string, string> = {}) =>
  fetch(`${baseUrl()}${path}`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', ...headers },
    body: JSON.stringify(body),
    redirect: 'manual',
  });

async function signUpByApi(email: string, password = 'a long enough password') {
  const res = await postJson('/api/auth/sign-up', { email, password, displayName: email.split('@')[0] });
  expect(res.status).toBe(201);
  return (await res.json()) as { userId: string; crewId: string };
}

describe('accounts in Chromium', () => {
  test('sign up, verify by the mailed link, create a crew, invite a mechanic who signs up from the mail and sees the crew; another crew’s lead gets 404', async () => {
    const leadEmail = `ada-${run}@e2e.example`;
    const mechanicEmail = `wren-${run}@e2e.example`;
    const crewName = `Valley crew ${run}`;

    const lead = await (await newContext(browser, DESKTOP)).newPage();
    await lead.goto('/sign-up');
    await lead.getByLabel('E-mail address').fill(leadEmail);
    await lead.getByLabel('Your name').fill('Ada Lead');
    await lead.getByLabel('Password').fill('larch valley gearbox');
    await Promise.all([
      lead.waitForURL(/\/\?welcome=1$/),
      lead.getByRole('button', { name: 'Create account' }).click(),
    ]);
    await expect(lead.getByTestId('current-crew').textContent()).resolves.toContain('Ada Lead’s crew');

    // The verification link, followed from the mailbox page.
    const verifyMail = await waitForMail(db, leadEmail, /Confirm your e-mail/);
    await lead.goto(`/dev/mailbox/${verifyMail.id}`);
    const verifyHref = await lead.getByTestId('mail-text').locator('a').first().getAttribute('href');
    expect(verifyHref).toMatch(/\/verify-email\?token=/);
    await lead.getByTestId('mail-text').locator('a').first().click();
    await expect(lead.getByTestId('form-info').textContent()).resolves.toContain('confirmed');
    // The same link a second time is refused.
    const again = await lead.goto(new URL(verifyHref!).pathname + new URL(verifyHref!).search);
    expect(again?.status()).toBe(400);
    await expect(lead.getByTestId('form-error').textContent()).resolves.toContain('already been used');

    // The crew page opens on the crew of one made at sign-up; starting another crew is a folded link below it.
    await lead.goto('/crews');
    await expect(lead.locator('h1').textContent()).resolves.toBe('Ada Lead’s crew');
    await expect(lead.getByTestId('empty-state').textContent()).resolves.toContain('Only you so far');
    await lead.locator('[data-testid=new-crew] > summary').click();
    await lead.getByLabel('Crew name').fill(crewName);
    await Promise.all([
      lead.waitForURL(/\/crews\/[0-9a-f-]{36}$/),
      lead.getByRole('button', { name: 'Create crew' }).click(),
    ]);
    const crewPath = new URL(lead.url()).pathname;
    await lead.getByLabel('E-mail address').fill(mechanicEmail);
    await lead.getByLabel('Role', { exact: true }).selectOption('mechanic');
    await lead.getByRole('button', { name: 'Send invitation' }).click();
    await expect(lead.getByTestId('form-info').textContent()).resolves.toContain(`Invitation sent to ${mechanicEmail}`);
    await expect(lead.getByTestId('invitations').textContent()).resolves.toContain(mechanicEmail);
    await screenshot(lead, 'crew-page-lead');

    // The mechanic opens the invitation from the mail in their own browser and signs up through it.
    const mechanic = await (await newContext(browser)).newPage();
    const inviteMail = await waitForMail(db, mechanicEmail, /invites you to the crew/);
    await mechanic.goto(`/dev/mailbox/${inviteMail.id}`);
    await mechanic.getByTestId('mail-text').locator('a').first().click();
    await expect(mechanic.getByRole('heading', { level: 1 }).textContent()).resolves.toContain(crewName);
    await mechanic.getByRole('link', { name: 'Create an account and join' }).click();
    await expect(mechanic.getByLabel('E-mail address').inputValue()).resolves.toBe(mechanicEmail);
    await mechanic.getByLabel('Password').fill('wren spanner torque');
    await Promise.all([
      mechanic.waitForURL(new RegExp(`${crewPath}\\?joined=1$`)),
      mechanic.getByRole('button', { name: 'Create account' }).click(),
    ]);
    await expect(mechanic.locator('main').textContent()).resolves.toContain('You are mechanic here');
    await expect(mechanic.getByTestId('members').textContent()).resolves.toContain(leadEmail);
    await screenshot(mechanic, 'crew-page-mechanic');

    // The lead now sees the mechanic and the acceptance in the security log.
    await lead.reload();
    await expect(lead.getByTestId('members').textContent()).resolves.toContain(mechanicEmail);
    await expect(lead.getByTestId('audit-log').textContent()).resolves.toContain('Invitation accepted');

    // A lead of another crew cannot see it.
    const outsider = await (await newContext(browser)).newPage();
    await signInAs(outsider, MATRIX_USERS.otherLead, MATRIX_PASSWORD);
    const res = await outsider.goto(crewPath);
    expect(res?.status()).toBe(404);
    await outsider.context().close();
    await mechanic.context().close();
    await lead.context().close();
  });

  test('a wrong password keeps the e-mail in the form and shows the error beside it', async () => {
    const email = `form-${run}@e2e.example`;
    await signUpByApi(email);
    const page = await (await newContext(browser)).newPage();
    await page.goto('/sign-in');
    await page.getByLabel('E-mail address').fill(email);
    await page.getByLabel('Password').fill('not the right one');
    const [res] = await Promise.all([
      page.waitForResponse((r) => r.url().endsWith('/sign-in') && r.request().method() === 'POST'),
      page.getByRole('button', { name: 'Sign in' }).click(),
    ]);
    expect(res.status()).toBe(401);
    await expect(page.getByLabel('E-mail address').inputValue()).resolves.toBe(email);
    await expect(page.getByTestId('form-error').textContent()).resolves.toContain('do not match');
    await page.context().close();
  });
});

describe('attacks against the built server', () => {
  test('wrong password and unknown e-mail get the same status and body', async () => {
    const email = `same-${run}@e2e.example`;
    await signUpByApi(email);
    const wrong = await postJson('/api/auth/sign-in', { email, password: 'wrong password here' });
    const unknown = await postJson('/api/auth/sign-in', {
      email: `nobody-${run}@e2e.example`,
      password: 'wrong password here',
    });
    expect([wrong.status, unknown.status]).toEqual([401, 401]);
    expect(await unknown.json()).toEqual(await wrong.json());
  });

  test('the sixth wrong password in a row answers 429 with Retry-After', async () => {
    const email = `limit-${run}@e2e.example`;
    await signUpByApi(email);
    const statuses: number[] = [];
    let last: Response | undefined;
    for (let i = 0; i < 6; i++) {
      last = await postJson('/api/auth/sign-in', { email, password: `wrong password ${i}` });
      statuses.push(last.status);
    }
    expect(statuses).toEqual([401, 401, 401, 401, 401, 429]);
    expect(Number(last!.headers.get('retry-after'))).toBeGreaterThan(0);
    expect(((await last!.json()) as { error: { code: string } }).error.code).toBe('rate_limited');
  });

  test.each([
    [
      'JSON endpoint',
      '/api/auth/sign-in',
      'application/json',
      JSON.stringify({ email: 'a@e2e.example', password: 'x'.repeat(40_000) }),
    ],
    [
      'form page',
      '/sign-in',
      'application/x-www-form-urlencoded',
      `email=a%40e2e.example&password=${'x'.repeat(40_000)}`,
    ],
  ])('an oversized body to a %s answers 413', async (_kind, path, type, body) => {
    const res = await fetch(`${baseUrl()}${path}`, {
      method: 'POST',
      headers: { 'content-type': type, origin: baseUrl() },
      body,
      redirect: 'manual',
    });
    expect(res.status).toBe(413);
  });

  test('a cross-site form post is refused with 403', async () => {
    const res = await fetch(`${baseUrl()}/sign-in`, {
      method: 'POST',
      redirect: 'manual',
      headers: { 'content-type': 'application/x-www-form-urlencoded', origin: 'https://attacker.example' },
      body: 'email=a%40e2e.example&password=whatever-long',
    });
    expect(res.status).toBe(403);
  });

  test('a forged role beside an invitation acceptance is ignored: the invited role wins', async () => {
    const email = `forged-${run}@e2e.example`;
    const { userId } = await signUpByApi(email);
    const token = generateToken();
    await db
      .insertInto('crew_invitations')
      .values({
        crew_id: crews.crewA.id,
        email,
        role: 'rider',
        token_hash: hashToken(token),
        invited_by: crews.crewA.leadId,
        expires_at: new Date(Date.now() + 3_600_000),
      })
      .execute();
    const cookie = await sessionCookieFor(baseUrl(), email, 'a long enough password');
    const res = await fetch(`${baseUrl()}/invitations/${token}`, {
      method: 'POST',
      redirect: 'manual',
      headers: { cookie, origin: baseUrl(), 'content-type': 'application/x-www-form-urlencoded' },
      body: 'role=lead&crewId=whatever',
    });
    expect(res.status).toBe(303);
    const m = await db
      .selectFrom('crew_members')
      .select('role')
      .where('crew_id', '=', crews.crewA.id)
      .where('user_id', '=', userId)
      .executeTakeFirstOrThrow();
    expect(m.role).toBe('rider');
  });

  test('a mechanic cannot promote themselves by sending a role', async () => {
    const cookie = await sessionCookieFor(baseUrl(), MATRIX_USERS.mechanic, MATRIX_PASSWORD);
    const res = await fetch(`${baseUrl()}/api/crews/${crews.crewA.id}/members/${crews.crewA.mechanicId}`, {
      method: 'PATCH',
      headers: { cookie, origin: baseUrl(), 'content-type': 'application/json' },
      body: JSON.stringify({ role: 'lead' }),
    });
    expect(res.status).toBe(403);
    expect(await res.json()).toEqual({ error: { code: 'forbidden', message: expect.any(String), fields: {} } });
  });

  test('an invitation for another address is refused for a signed-in user', async () => {
    const email = `other-addr-${run}@e2e.example`;
    await signUpByApi(email);
    const token = generateToken();
    await db
      .insertInto('crew_invitations')
      .values({
        crew_id: crews.crewA.id,
        email: `someone-else-${run}@e2e.example`,
        role: 'mechanic',
        token_hash: hashToken(token),
        invited_by: crews.crewA.leadId,
        expires_at: new Date(Date.now() + 3_600_000),
      })
      .execute();
    const cookie = await sessionCookieFor(baseUrl(), email, 'a long enough password');
    const res = await fetch(`${baseUrl()}/invitations/${token}`, {
      method: 'POST',
      redirect: 'manual',
      headers: { cookie, origin: baseUrl(), 'content-type': 'application/x-www-form-urlencoded' },
      body: '',
    });
    expect(res.status).toBe(403);
    expect(await res.text()).toContain('another e-mail address');
  });

  test('an expired reset link is refused', async () => {
    const res = await fetch(`${baseUrl()}/reset-password?token=${generateToken()}`);
    expect(res.status).toBe(400);
  });

  test('another crew’s machine answers 404, the crew’s own lead gets 200', async () => {
    const machine = await makeMachine(db, crews.crewA.id, crews.crewA.riderId, { name: 'Isolation 450' } as never);
    const other = await sessionCookieFor(baseUrl(), MATRIX_USERS.otherLead, MATRIX_PASSWORD);
    const own = await sessionCookieFor(baseUrl(), MATRIX_USERS.lead, MATRIX_PASSWORD);
    const [a, b] = await Promise.all([
      fetch(`${baseUrl()}/machines/${machine.id}`, { headers: { cookie: other } }),
      fetch(`${baseUrl()}/machines/${machine.id}`, { headers: { cookie: own } }),
    ]);
    expect([a.status, b.status]).toEqual([404, 200]);
    expect(await a.text()).not.toContain('Isolation 450');
  });

  test('the session cookie is HttpOnly and SameSite=Lax, sign-in rotates it, and a late background fetch cannot clear the new one', async () => {
    const email = `cookie-${run}@e2e.example`;
    await signUpByApi(email);
    const first = await postJson('/api/auth/sign-in', { email, password: 'a long enough password' });
    const setCookie = first.headers.getSetCookie().find((c) => c.startsWith('sumpwise_session='))!;
    expect(setCookie).toMatch(/HttpOnly/i);
    expect(setCookie).toMatch(/SameSite=Lax/i);
    expect(setCookie).not.toMatch(/Secure/i); // the e2e public URL is http://127.0.0.1
    const oldCookie = setCookie.split(';')[0]!;
    const second = await postJson(
      '/api/auth/sign-in',
      { email, password: 'a long enough password' },
      { cookie: oldCookie, origin: baseUrl() },
    );
    const newCookie = second.headers
      .getSetCookie()
      .find((c) => c.startsWith('sumpwise_session='))!
      .split(';')[0]!;
    expect(newCookie).not.toBe(oldCookie);
    expect((await fetch(`${baseUrl()}/api/auth/me`, { headers: { cookie: oldCookie } })).status).toBe(401);
    expect((await fetch(`${baseUrl()}/api/auth/me`, { headers: { cookie: newCookie } })).status).toBe(200);

    // A page's background fetch that left with the old cookie must not clear the new one when it comes back
    // late; a navigation (or a client without Fetch Metadata) with the old cookie still clears it.
    // node:http, because Node's fetch always sends its own Sec-Fetch-Mode: cors.
    const blankFrom = (headers: Record<string, string>) =>
      new Promise<boolean>((resolve, reject) => {
        http
          .get(`${baseUrl()}/`, { headers: { cookie: oldCookie, ...headers } }, (res) => {
            res.resume();
            resolve((res.headers['set-cookie'] ?? []).some((c) => /^sumpwise_session=;/.test(c)));
          })
          .on('error', reject);
      });
    expect(await blankFrom({ 'sec-fetch-mode': 'cors', 'sec-fetch-dest': 'empty' })).toBe(false);
    expect(await blankFrom({ 'sec-fetch-mode': 'navigate', 'sec-fetch-dest': 'document' })).toBe(true);
    expect(await blankFrom({})).toBe(true);
  });
});
