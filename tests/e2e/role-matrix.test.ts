// Sends every row of the role matrix to the built server as each visitor (anonymous, rider, mechanic and
// lead of crew A, and the lead of crew B) and compares the status with the table.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { inject } from 'vitest';
import type { Kysely } from 'kysely';
import { createDb } from '../../src/lib/db/db';
import type { Database } from '../../src/lib/db/database';
import { ROLE_MATRIX, VISITORS, type MatrixContext, type MatrixRow, type Visitor } from '../integration/role-matrix.routes';
import { baseUrl } from './helpers/browser';
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

/** Sends one row's request as one visitor and returns the status. */
async function send(row: MatrixRow, visitor: Visitor): Promise<number> {
  const path = typeof row.path === 'function' ? await row.path(ctx, visitor) : row.path;
  const headers: Record<string, string> = {};
  const cookie = await cookieFor(visitor, row.freshSession ?? false);
  if (cookie) headers.cookie = cookie;
  // Browsers send Origin on every same-origin request that is not a GET; the origin check expects it.
  if (row.method !== 'GET') headers.origin = row.origin ?? baseUrl();
  let body: string | undefined;
  if (row.json !== undefined) {
    headers['content-type'] = 'application/json';
    body = JSON.stringify(row.json === 'crewA' ? { crewId: ctx.crewA.id } : row.json);
  } else if (row.form) {
    headers['content-type'] = 'application/x-www-form-urlencoded';
    body = new URLSearchParams(row.form).toString();
  }
  const res = await fetch(`${baseUrl()}${path}`, { method: row.method, headers, body, redirect: 'manual' });
  await res.arrayBuffer();
  return res.status;
}

describe('role matrix against the built server', () => {
  beforeAll(async () => {
    db = createDb(inject('databaseUrl'), { max: 2 });
    ctx = { db, ...(await ensureMatrixAccounts(db)) };
  });
  afterAll(async () => { await db?.destroy(); });

  test.each(ROLE_MATRIX.map((row) => [`${row.method} ${row.route}${row.note ? ` (${row.note})` : ''}`, row] as const))('%s', async (_name, row) => {
    const got: Record<string, number> = {};
    for (const visitor of VISITORS) got[visitor] = await send(row, visitor);
    expect(got).toEqual(row.expect);
  });
});
