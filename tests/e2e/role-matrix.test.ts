// Sends every row of the role matrix to the built server as each visitor (anonymous, rider, mechanic and
// lead of crew A, and the lead of crew B) and compares the status with the table.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { inject } from 'vitest';
import type { Kysely } from 'kysely';
import { createDb } from '~/lib/db/db';
import type { Database } from '~/lib/db/database';
import {
  ROLE_MATRIX,
  VISITORS,
  type MatrixContext,
  type MatrixRow,
  type Visitor,
} from '../integration/role-matrix.routes';
import { baseUrl } from './helpers/browser';
import { makeMachine } from '../integration/factories';
import { MATRIX_PASSWORD, MATRIX_USERS, ensureMatrixAccounts } from './helpers/matrix-accounts';
import { sessionCookieFor } from './helpers/sign-in';

let db: Kysely<Database>;
let ctx: MatrixContext;
const cookies = new Map<Visitor, string>();

async function cookieFor(visitor: Visitor, fresh: boolean): Promise<string | null> {
  if (visitor === 'anonymous') return null;
  if (fresh || !cookies.has(visitor)) {
    const c = await sessionCookieFor(baseUrl(), MATRIX_USERS[visitor], MATRIX_PASSWORD);
    if (fresh) return c;
    cookies.set(visitor, c);
  }
  return cookies.get(visitor)!;
}

/** Row bodies that name records of crew A: "crewA" switches to crew A; "riderMachineSample" registers a drain card for a fresh rider machine. */
async function jsonBody(json: unknown): Promise<unknown> {
  if (json === 'crewA') return { crewId: ctx.crewA.id };
  if (json === 'riderMachineSample') {
    const m = await makeMachine(ctx.db, ctx.crewA.id, ctx.crewA.riderId, { name: 'Matrix 450' } as never);
    return {
      machineId: m.id,
      bottleCode: `MX${randomUUID().slice(0, 8).toUpperCase()}`,
      drawnOn: '2025-01-01',
      odometer: 5,
    };
  }
  return json;
}

interface Answer {
  status: number;
  location: string | null;
  contentType: string;
  body: string;
}

/** Sends one row's request as one visitor and returns the answer. */
async function request(row: MatrixRow, visitor: Visitor): Promise<Answer> {
  const path = typeof row.path === 'function' ? await row.path(ctx, visitor) : row.path;
  const headers: Record<string, string> = {};
  const cookie = await cookieFor(visitor, row.freshSession ?? false);
  if (cookie) headers.cookie = cookie;
  // Browsers send Origin on every same-origin request that is not a GET; the origin check expects it.
  if (row.method !== 'GET') headers.origin = row.origin ?? baseUrl();
  let body: string | undefined;
  if (row.json !== undefined) {
    headers['content-type'] = 'application/json';
    body = JSON.stringify(await jsonBody(row.json));
  } else if (row.form) {
    headers['content-type'] = 'application/x-www-form-urlencoded';
    body = new URLSearchParams(typeof row.form === 'function' ? row.form(ctx) : row.form).toString();
  }
  const res = await fetch(`${baseUrl()}${path}`, { method: row.method, headers, body, redirect: 'manual' });
  return {
    status: res.status,
    location: res.headers.get('location'),
    contentType: res.headers.get('content-type') ?? '',
    body: await res.text(),
  };
}

/** Sends one row's request as one visitor and returns the status. */
async function send(row: MatrixRow, visitor: Visitor): Promise<number> {
  return (await request(row, visitor)).status;
}

/** The styled not-found page (src/pages/404.astro) inside the app shell, as opposed to a bare status. */
function expectNotFoundPage(a: Answer): void {
  expect(a.status).toBe(404);
  expect(a.contentType).toMatch(/^text\/html/);
  expect(a.body).toContain('Nothing here');
  expect(a.body).toContain('href="/"');
  expect(a.body).toContain('Sumpwise home');
}

describe('role matrix against the built server', () => {
  beforeAll(async () => {
    db = createDb(inject('databaseUrl'), { max: 2 });
    // The server keeps photos in its local object store (helpers/server.ts); photo rows put their bytes there.
    process.env.MATRIX_S3_ENDPOINT ??= inject('s3Endpoint');
    ctx = { db, ...(await ensureMatrixAccounts(db)) };
  });
  afterAll(async () => {
    await db?.destroy();
  });

  test.each(ROLE_MATRIX.map((row) => [`${row.method} ${row.route}${row.note ? ` (${row.note})` : ''}`, row] as const))(
    '%s',
    async (_name, row) => {
      const got: Record<string, number> = {};
      for (const visitor of VISITORS) got[visitor] = await send(row, visitor);
      expect(got).toEqual(row.expect);
    },
  );
});

describe('answers behind the statuses', () => {
  beforeAll(async () => {
    db = createDb(inject('databaseUrl'), { max: 2 });
    ctx = { db, ...(await ensureMatrixAccounts(db)) };
  });
  afterAll(async () => {
    await db?.destroy();
  });

  // Every page (not a JSON endpoint) that answers another crew's lead 404 shows the styled page, and no
  // record of crew A: the matrix machines are all named "Matrix 450".
  const pageRows = ROLE_MATRIX.filter(
    (r) => r.method === 'GET' && !r.route.startsWith('/api/') && r.expect.otherLead === 404,
  );
  test.each(pageRows.map((r) => [`${r.route}${r.note ? ` (${r.note})` : ''}`, r] as const))(
    'another crew gets the not-found page: GET %s',
    async (_n, row) => {
      const a = await request(row, 'otherLead');
      expectNotFoundPage(a);
      expect(a.body).not.toContain('Matrix 450');
    },
  );

  test.each<[string, Visitor]>([
    ['/no-such-page', 'anonymous'],
    ['/no-such-page', 'rider'],
    ['/machines/00000000-0000-4000-8000-000000000000', 'lead'],
  ])('an unknown address %s (%s) gets the not-found page', async (path, visitor) => {
    expectNotFoundPage(await request({ route: path, method: 'GET', path, expect: all404 }, visitor));
  });

  // Form posts to pages (not JSON endpoints) that another crew's lead cannot reach get the same page.
  const formRows = ROLE_MATRIX.filter(
    (r) => r.method === 'POST' && r.form && !r.route.startsWith('/api/') && r.expect.otherLead === 404,
  );
  test.each(formRows.map((r) => [`${r.route}${r.note ? ` (${r.note})` : ''}`, r] as const))(
    'another crew gets the not-found page: POST %s',
    async (_n, row) => {
      expectNotFoundPage(await request(row, 'otherLead'));
    },
  );

  test("a form post for another crew's sample gets the not-found page, not a trip back to that sample", async () => {
    const row = ROLE_MATRIX.find((r) => r.route === '/api/reviews/[sampleId]/notes' && r.form)!;
    expectNotFoundPage(await request(row, 'otherLead'));
  });

  test('oil tools name a machine of the own crew only', async () => {
    const row = ROLE_MATRIX.find((r) => r.route === '/tools' && typeof r.path === 'function')!;
    const own = await request(row, 'lead');
    const other = await request(row, 'otherLead');
    expect([own.status, other.status]).toEqual([200, 200]);
    expect(own.body).toContain('Matrix 450');
    expect(other.body).not.toContain('Matrix 450');
  });

  test('the crew switcher form from a signed-out browser goes to sign in and back to its page', async () => {
    const row = ROLE_MATRIX.find((r) => r.route === '/api/crews/switch' && r.form)!;
    const a = await request(row, 'anonymous');
    expect([a.status, a.location]).toEqual([303, '/sign-in?next=%2Fmachines']);
  });

  test.each(['/api/reviews/[sampleId]/notes', '/api/reviews/[sampleId]/call'])(
    '%s: a signed-out form goes to sign in and back to the sample; JSON gets 401',
    async (route) => {
      const formRow = ROLE_MATRIX.find((r) => r.route === route && r.form)!;
      const sampleId = (
        await (formRow.path as (c: MatrixContext, v: Visitor) => Promise<string>)(ctx, 'anonymous')
      ).split('/')[3]!;
      const form = await request(
        { ...formRow, path: `/api/reviews/${sampleId}/${route.split('/').pop()}` },
        'anonymous',
      );
      expect(form.status).toBe(303);
      expect(form.location).toBe(`/sign-in?next=${encodeURIComponent(`/samples/${sampleId}`)}`);
      const jsonRow = ROLE_MATRIX.find((r) => r.route === route && r.json !== undefined)!;
      const json = await request(
        { ...jsonRow, path: `/api/reviews/${sampleId}/${route.split('/').pop()}` },
        'anonymous',
      );
      expect(json.status).toBe(401);
      expect(json.contentType).toMatch(/^application\/json/);
      expect(JSON.parse(json.body)).toMatchObject({ error: { code: 'unauthenticated' } });
    },
  );
});

// A page shows a state-changing form only to the roles whose post the server accepts; the statuses above
// prove the server refuses the others, this proves the page does not offer them the form.
describe('forms offered by role', () => {
  beforeAll(async () => {
    db = createDb(inject('databaseUrl'), { max: 2 });
    ctx = { db, ...(await ensureMatrixAccounts(db)) };
  });
  afterAll(async () => {
    await db?.destroy();
  });

  const pathOf = (route: string, pick: (r: MatrixRow) => boolean = () => true) =>
    ROLE_MATRIX.find((r) => r.route === route && r.method === 'GET' && pick(r))!.path;
  /** A form that posts back to its own page (the app shell's sign-out and crew forms name their action). */
  const ownForm = /<form method="post"(?![^>]*action=)/;
  const cases: [string, MatrixRow['path'], RegExp, Visitor[], Visitor[]][] = [
    [
      'machine page: edit, drain card, oil change, wear part links',
      pathOf('/machines/[id]'),
      /href="\/machines\/[^"]+\/(edit|drain-card|oil-change|wear-parts\/new)"/,
      ['rider', 'lead'],
      ['mechanic'],
    ],
    ['sample page: mark shipped', pathOf('/samples/[id]'), ownForm, ['rider', 'lead'], ['mechanic']],
    [
      'wear part page: record a measurement',
      pathOf('/machines/[id]/wear-parts/[partId]'),
      ownForm,
      ['rider', 'lead'],
      ['mechanic'],
    ],
    [
      'sample page: review note form',
      pathOf('/samples/[id]'),
      /action="\/api\/reviews\/[^"]+\/notes"/,
      ['mechanic', 'lead'],
      ['rider'],
    ],
    [
      'sample page with results: interval call forms',
      async (c) =>
        `/samples/${(await (ROLE_MATRIX.find((r) => r.route === '/api/reviews/[sampleId]/call' && r.json !== undefined && r.expect.mechanic === 201)!.path as (x: MatrixContext, v: Visitor) => Promise<string>)(c, 'lead')).split('/')[3]}`,
      /action="\/api\/reviews\/[^"]+\/call"/,
      ['mechanic', 'lead'],
      ['rider'],
    ],
    [
      'machines list: add a machine',
      '/machines',
      /href="\/machines\/new"/,
      ['rider', 'lead', 'otherLead'],
      ['mechanic'],
    ],
  ];
  test.each(cases)('%s', async (_label, path, form, offered, withheld) => {
    for (const visitor of [...offered, ...withheld]) {
      const a = await request({ route: '', method: 'GET', path, expect: all404 }, visitor);
      expect(a.status, visitor).toBe(200);
      if (offered.includes(visitor)) expect(a.body, `${visitor} is offered the form`).toMatch(form);
      else expect(a.body, `${visitor} is not offered the form`).not.toMatch(form);
    }
  });
});

const all404: Record<Visitor, number> = { anonymous: 404, rider: 404, mechanic: 404, lead: 404, otherLead: 404 };
