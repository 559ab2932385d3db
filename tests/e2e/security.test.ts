// Security of the built app from the outside: the hardening headers on every kind of response, a content
// security policy the pages really pass in Chromium, a Secure session cookie behind an https public address, and
// uploads that lie about their type. Already covered elsewhere (not repeated here): the sixth wrong password
// answering 429 with Retry-After and the cookie's HttpOnly / SameSite=Lax / no Secure on http (accounts.test.ts),
// and a PNG renamed .csv refused by the lab upload route (tests/integration/lab-import/lab-import.routes.test.ts).
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { ChildProcess } from 'node:child_process';
import type { Kysely } from 'kysely';
import { PNG } from 'pngjs';
import { afterAll, beforeAll, describe, expect, inject, test } from 'vitest';
import type { Page } from 'playwright-core';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';
import { DEMO_ACCOUNTS, DEMO_SCHOOL_NAME } from '../../sample-data/seed-accounts';
import { SERVE_ARGS } from '../../scripts/lib/build';
import { freePort, httpOk, startService, stopService, waitFor } from '../../scripts/lib/processes';
import { DESKTOP, baseUrl, newContext, useBrowser } from './helpers/browser';
import { sessionCookieFor, signInAs } from './helpers/sign-in';

const lead = DEMO_ACCOUNTS.find((a) => a.key === 'lead')!;
let db: Kysely<Database>;
let cookie: string;
let machineId: string;
let sampleId: string;

beforeAll(async () => {
  db = createDb(inject('databaseUrl'), { max: 2 });
  cookie = await sessionCookieFor(baseUrl(), lead.email, lead.password);
  const machine = await db
    .selectFrom('machines')
    .innerJoin('crews', 'crews.id', 'machines.crew_id')
    .select('machines.id')
    .where('crews.name', '=', DEMO_SCHOOL_NAME)
    .orderBy('machines.name')
    .executeTakeFirstOrThrow();
  machineId = machine.id;
  const sample = await db
    .selectFrom('samples')
    .select('id')
    .where('machine_id', '=', machineId)
    .where('state', 'in', ['results_in', 'reviewed'])
    .orderBy('drawn_on', 'desc')
    .executeTakeFirstOrThrow();
  sampleId = sample.id;
});
afterAll(async () => {
  await db?.destroy();
});

/** Checks the headers every response must carry; returns the problems in words (empty when all is well). */
function headerProblems(res: Response): string[] {
  const problems: string[] = [];
  const csp = res.headers.get('content-security-policy') ?? '';
  if (!/(^|;)\s*frame-ancestors 'none'\s*(;|$)/.test(csp))
    problems.push(`CSP without frame-ancestors 'none': "${csp}"`);
  if (!/(^|;)\s*default-src 'self'/.test(csp)) problems.push(`CSP without default-src 'self'`);
  if (!/(^|;)\s*object-src 'none'/.test(csp)) problems.push(`CSP without object-src 'none'`);
  // Scripts by origin and hash only: an injected inline script never runs.
  if (!/(^|;)\s*script-src 'self'/.test(csp)) problems.push(`CSP without script-src 'self'`);
  if (/script-src[^;]*'unsafe-(inline|eval)'/.test(csp)) problems.push(`CSP allows unsafe scripts: "${csp}"`);
  if (res.headers.get('x-content-type-options') !== 'nosniff')
    problems.push(`x-content-type-options: ${res.headers.get('x-content-type-options')}`);
  const referrer = res.headers.get('referrer-policy') ?? '';
  if (!['same-origin', 'strict-origin-when-cross-origin', 'no-referrer', 'strict-origin'].includes(referrer))
    problems.push(`referrer-policy: "${referrer}"`);
  return problems;
}

/** A PNG of a few pixels. */
function smallPng(): Uint8Array {
  const png = new PNG({ width: 4, height: 3 });
  png.data.fill(180);
  return new Uint8Array(PNG.sync.write(png));
}

async function postPhoto(bytes: Uint8Array | string, name: string, type: string): Promise<Response> {
  const form = new FormData();
  form.append('file', new Blob([typeof bytes === 'string' ? bytes : Buffer.from(bytes)], { type }), name);
  return fetch(`${baseUrl()}/api/photos`, {
    method: 'POST',
    headers: { cookie, origin: baseUrl(), accept: 'application/json' },
    body: form,
  });
}

describe('response headers on every kind of response', () => {
  test('pages, redirects, JSON, errors, CSV and photo bytes all carry CSP, nosniff and a referrer policy', async () => {
    const photo = await postPhoto(smallPng(), 'headers.png', 'image/png');
    expect(photo.status).toBe(201);
    const photoUrl = ((await photo.json()) as { photo: { url: string } }).photo.url;

    const signedIn = { cookie };
    const cases: { kind: string; path: string; init?: RequestInit; status: number }[] = [
      { kind: 'public page', path: '/sign-in', status: 200 },
      { kind: 'home page', path: '/', init: { headers: signedIn }, status: 200 },
      {
        kind: 'machine page with the wear chart',
        path: `/machines/${machineId}`,
        init: { headers: signedIn },
        status: 200,
      },
      { kind: 'sample page', path: `/samples/${sampleId}`, init: { headers: signedIn }, status: 200 },
      { kind: 'bottle tag', path: `/samples/${sampleId}/tag`, init: { headers: signedIn }, status: 200 },
      { kind: 'crew overview', path: '/overview', init: { headers: signedIn }, status: 200 },
      { kind: 'lab import page', path: '/imports', init: { headers: signedIn }, status: 200 },
      { kind: 'oil tools', path: '/tools', init: { headers: signedIn }, status: 200 },
      { kind: 'redirect to sign-in', path: '/machines', init: { redirect: 'manual' }, status: 302 },
      { kind: 'page not found', path: '/no-such-page', status: 404 },
      {
        kind: "another crew's machine (404)",
        path: '/machines/00000000-0000-4000-8000-000000000000',
        init: { headers: signedIn },
        status: 404,
      },
      { kind: 'health JSON', path: '/api/health', status: 200 },
      {
        kind: 'trend JSON',
        path: `/api/trends/${machineId}?measurands=Fe,Al,Si`,
        init: { headers: signedIn },
        status: 200,
      },
      { kind: 'JSON 401', path: '/api/auth/me', status: 401 },
      {
        kind: 'JSON 400 on a POST',
        path: '/api/auth/sign-in',
        init: { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{"email": 1}' },
        status: 400,
      },
      { kind: 'CSV export', path: '/api/exports/readings.csv', init: { headers: signedIn }, status: 200 },
      { kind: 'photo bytes', path: photoUrl, init: { headers: signedIn }, status: 200 },
    ];
    const problems: string[] = [];
    for (const c of cases) {
      const res = await fetch(`${baseUrl()}${c.path}`, c.init);
      await res.arrayBuffer();
      if (res.status !== c.status && !(c.status === 302 && [301, 302, 303, 307].includes(res.status)))
        problems.push(`${c.kind} ${c.path}: status ${res.status}, expected ${c.status}`);
      for (const p of headerProblems(res)) problems.push(`${c.kind} ${c.path}: ${p}`);
    }
    expect(problems).toEqual([]);
  });

  // Files under dist/client (built CSS/JS, public/) are answered by the Node adapter's static handler before
  // src/middleware.ts runs; scripts/serve.ts puts the headers on them.
  test('built assets and public files carry the same headers', async () => {
    const signInHtml = await (await fetch(`${baseUrl()}/sign-in`)).text();
    const asset = /(?:href|src)="(\/_astro\/[^"]+\.(?:css|js))"/.exec(signInHtml)?.[1];
    expect(asset, 'the sign-in page links a built asset').toBeTruthy();
    const problems: string[] = [];
    for (const p of [asset!, '/favicon.svg']) {
      const res = await fetch(`${baseUrl()}${p}`);
      await res.arrayBuffer();
      expect(res.status).toBe(200);
      for (const problem of headerProblems(res)) problems.push(`${p}: ${problem}`);
    }
    expect(problems).toEqual([]);
  });
});

describe('the content security policy holds in Chromium', () => {
  const browser = useBrowser();

  /** Visits each path (waiting for islands to load) and returns every CSP violation reported on the way. */
  async function visit(page: Page, paths: string[]): Promise<string[]> {
    const violations: string[] = [];
    page.on('console', (m) => {
      if (/Content Security Policy/i.test(m.text())) violations.push(`${page.url()}: ${m.text()}`);
    });
    page.on('pageerror', (e) => {
      if (/Content Security Policy/i.test(e.message)) violations.push(`${page.url()}: ${e.message}`);
    });
    for (const p of paths) {
      const res = await page.goto(p, { waitUntil: 'networkidle' });
      expect(res?.status(), p).toBeLessThan(400);
      // Islands marked client:visible load only once scrolled to; their scripts must pass the policy too.
      await page.evaluate(() => window.scrollTo(0, document.body.scrollHeight));
      await page.waitForLoadState('networkidle');
    }
    return violations;
  }

  test('signed out and as the demo lead: no page reports a CSP violation, and the islands run', async () => {
    const context = await newContext(browser(), DESKTOP);
    // The browser's own violation event as well as its console line, in case one of the two is not printed.
    await context.addInitScript(() => {
      document.addEventListener('securitypolicyviolation', (e) =>
        console.error(`Content Security Policy violation: ${e.violatedDirective} blocked ${e.blockedURI}`),
      );
    });
    // The offline page warmer (covered by offline.test.ts) fetches a dozen garage pages one by one after sign-in;
    // on a busy machine that keeps the network from going idle for longer than a page load may wait here.
    await context.route('**/api/offline/pages', (route) => route.fulfill({ status: 503, body: '' }));
    const page = await context.newPage();
    const out = await visit(page, ['/sign-in', '/sign-up', '/forgot-password', '/rules']);
    await signInAs(page, lead.email, lead.password);
    const labFile = await db
      .selectFrom('lab_files')
      .innerJoin('crews', 'crews.id', 'lab_files.crew_id')
      .select('lab_files.id')
      .where('crews.name', '=', DEMO_SCHOOL_NAME)
      .executeTakeFirst();
    out.push(
      ...(await visit(page, [
        '/',
        '/overview',
        '/machines',
        `/machines/${machineId}`,
        `/machines/${machineId}/history`,
        `/machines/${machineId}/drain-card`,
        `/machines/${machineId}/oil-change`,
        `/samples/${sampleId}`,
        `/samples/${sampleId}/tag`,
        '/samples',
        '/imports',
        ...(labFile ? [`/imports/${labFile.id}`] : []),
        '/tools',
        '/account',
        '/account/notifications',
        '/crews',
      ])),
    );
    // The wear chart island drew on its canvas and the lab upload island mounted: scripts were not blocked.
    await page.goto(`/machines/${machineId}`, { waitUntil: 'networkidle' });
    await page.locator('astro-island').last().scrollIntoViewIfNeeded();
    await page.locator('canvas').first().waitFor({ state: 'attached', timeout: 15_000 });
    await page.goto('/imports', { waitUntil: 'networkidle' });
    await page.locator('.uppy-Dashboard').first().waitFor({ state: 'attached', timeout: 15_000 });
    expect(out).toEqual([]);

    // Control: the same listeners do see a violation when one happens (a script from another origin).
    const control = await context.newPage();
    const seen = await visit(control, ['/sign-in']);
    await control.evaluate(() => {
      const s = document.createElement('script');
      s.src = 'https://cdn.example.invalid/tracker.js';
      document.head.append(s);
    });
    await control.waitForTimeout(500);
    expect(seen.join('\n')).toMatch(/script-src/);
    // An inline script slipped into the page (what an XSS would do) is blocked too, and does not run.
    seen.length = 0;
    const ran = await control.evaluate(async () => {
      const s = document.createElement('script');
      s.textContent = 'window.__injected = true';
      document.body.append(s);
      await new Promise((r) => setTimeout(r, 200));
      return (window as unknown as { __injected?: boolean }).__injected === true;
    });
    expect(ran).toBe(false);
    expect(seen.join('\n')).toMatch(/script-src/);
    await context.close();
  }, 180_000);
});

describe('session cookie behind an https public address', () => {
  let server: ChildProcess | undefined;
  let uploads = '';
  afterAll(async () => {
    await stopService(server);
    if (uploads) rmSync(uploads, { recursive: true, force: true });
  });

  test('a second server with PUBLIC_URL=https://… sets the session cookie Secure (and still HttpOnly, SameSite=Lax)', async () => {
    const port = await freePort();
    uploads = mkdtempSync(path.join(os.tmpdir(), 'sumpwise-security-'));
    const local = `http://127.0.0.1:${port}`;
    server = startService(
      'app-https',
      process.execPath,
      SERVE_ARGS,
      {
        ...process.env,
        NODE_ENV: 'production',
        DATABASE_URL: inject('databaseUrl'),
        HOST: '127.0.0.1',
        PORT: String(port),
        PUBLIC_URL: 'https://sumpwise.example',
        SMTP_URL: 'smtp://127.0.0.1:9',
        UPLOAD_DIR: uploads,
        APP_PROCESSES: '1',
        ASTRO_TELEMETRY_DISABLED: '1',
      },
      true,
    );
    await waitFor(() => httpOk(`${local}/api/health`).catch(() => false), 30_000, 'the https-addressed server');
    // TLS ends at a proxy in front of such a server; here the request reaches it directly over loopback.
    const res = await fetch(`${local}/api/auth/sign-in`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: lead.email, password: lead.password }),
    });
    expect(res.status).toBe(200);
    const set = res.headers.getSetCookie().find((c) => c.startsWith('sumpwise_session='));
    expect(set).toBeDefined();
    expect(set).toMatch(/;\s*Secure/i);
    expect(set).toMatch(/;\s*HttpOnly/i);
    expect(set).toMatch(/;\s*SameSite=Lax/i);
  });
});

describe('uploads that lie about their type', () => {
  const leadPhotos = async () =>
    Number(
      (
        await db
          .selectFrom('photos')
          .innerJoin('users', 'users.id', 'photos.created_by')
          .select((eb) => eb.fn.countAll<string>().as('n'))
          .where('users.email', '=', lead.email)
          .executeTakeFirstOrThrow()
      ).n,
    );

  test.each([
    { name: 'a text file renamed .jpg', body: 'bolt order: 1 2 3 4\n', file: 'bolts.jpg', type: 'image/jpeg' },
    {
      name: 'an SVG with a script, sent as image/svg+xml',
      body: '<svg xmlns="http://www.w3.org/2000/svg"><script>alert(document.cookie)</script><rect width="10" height="10"/></svg>',
      file: 'plate.svg',
      type: 'image/svg+xml',
    },
    {
      name: 'an SVG renamed .png',
      body: '<svg xmlns="http://www.w3.org/2000/svg" onload="alert(1)"/>',
      file: 'plate.png',
      type: 'image/png',
    },
    {
      name: 'an HTML page renamed .jpg',
      body: '<!doctype html><script>fetch("/api/auth/me")</script>',
      file: 'gasket.jpg',
      type: 'image/jpeg',
    },
  ])('the photo upload refuses $name with 415 and stores nothing', async ({ body, file, type }) => {
    const before = await leadPhotos();
    const res = await postPhoto(body, file, type);
    expect(res.status).toBe(415);
    const json = (await res.json()) as { error: { code: string; message: string } };
    expect(json.error.code).toBe('not_an_image');
    expect(json.error.message).toMatch(/not a photo/);
    expect(await leadPhotos()).toBe(before);
  });

  test('a stored photo is served with its sniffed type, nosniff and the CSP, never as the name the uploader gave', async () => {
    const res = await postPhoto(smallPng(), 'looks-like.html', 'text/html');
    expect(res.status).toBe(201);
    const { photo } = (await res.json()) as { photo: { url: string; contentType: string } };
    expect(photo.contentType).toBe('image/png');
    const served = await fetch(`${baseUrl()}${photo.url}`, { headers: { cookie } });
    expect(served.headers.get('content-type')).toBe('image/png');
    expect(served.headers.get('x-content-type-options')).toBe('nosniff');
    expect(served.headers.get('content-disposition')).toBe('inline');
    expect(headerProblems(served)).toEqual([]);
  });
});
