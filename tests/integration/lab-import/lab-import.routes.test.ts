import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { Kysely } from 'kysely';
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type { CrewMembership, SessionUser } from '~/lib/auth/types';
import type { Database, Role } from '~/lib/db/database';
import { MAX_LAB_FILE_BYTES } from '~/lib/lab-csv/lab-csv';
import {
  handleConfirmJson,
  handlePreviewPost,
  handleUpload,
  type RouteContext,
} from '~/lib/lab-import/lab-import.routes';
import { addMember, makeUser } from '../factories';
import { openTestDb, truncateAll } from '../test-database';
import { bytesOf, countImportRows, makeImportCrew, makeSample } from './lab-import-fixtures';

const db: Kysely<Database> = openTestDb();
afterAll(async () => {
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

const CSV = 'Bottle,Sampled,Fe,Al,Si\nSW-1,2026-02-01,30,5,9\n';
const PNG = new Uint8Array(readFileSync(path.resolve(__dirname, '../../fixtures/lab-csv/bad-image.png')));

function sessionOf(userId: string, crewId: string, role: Role = 'lead'): RouteContext['locals'] {
  const user: SessionUser = {
    id: userId,
    email: 'x@example.test',
    displayName: 'X',
    emailVerified: true,
    distanceUnit: 'km',
    lengthUnit: 'mm',
    temperatureUnit: 'C',
  };
  const crew: CrewMembership = { crewId, crewName: 'Valley school', role };
  return { user, crew };
}

function uploadRequest(
  bytes: Uint8Array,
  options: { html?: boolean; extra?: Record<string, string>; name?: string } = {},
): Request {
  const form = new FormData();
  for (const [k, v] of Object.entries(options.extra ?? {})) form.append(k, v);
  form.append('file', new Blob([bytes as BlobPart]), options.name ?? 'report.csv');
  return new Request('http://127.0.0.1/api/imports', {
    method: 'POST',
    headers: { accept: options.html ? 'text/html,application/xhtml+xml' : 'application/json' },
    body: form,
  });
}

async function errorOf(res: Response) {
  return ((await res.json()) as { error: { code: string; message: string; fields: Record<string, string> } }).error;
}

describe('POST /api/imports', () => {
  test('stores a CSV and answers its preview address (201), then 200 for the same bytes', async () => {
    const { crewId, userId } = await makeImportCrew(db);
    const res = await handleUpload(db, { request: uploadRequest(bytesOf(CSV)), locals: sessionOf(userId, crewId) });
    expect(res.status).toBe(201);
    const body = (await res.json()) as { labFileId: string; previewUrl: string };
    expect(body.previewUrl).toBe(`/imports/${body.labFileId}`);
    const again = await handleUpload(db, { request: uploadRequest(bytesOf(CSV)), locals: sessionOf(userId, crewId) });
    expect(again.status).toBe(200);
    expect((await countImportRows(db)).lab_files).toBe(1);
  });

  test.each([
    ['over 5 MiB', () => new Uint8Array(MAX_LAB_FILE_BYTES + 200_000).fill(0x41), 413, 'file_too_large', /up to 5 MiB/],
    ['really an image', () => PNG, 415, 'image_file', /PNG image, not a CSV/],
  ])('a file %s is refused with a clear message and nothing is written', async (_name, make, status, code, message) => {
    const { crewId, userId } = await makeImportCrew(db);
    const res = await handleUpload(db, { request: uploadRequest(make()), locals: sessionOf(userId, crewId) });
    expect(res.status).toBe(status);
    const error = await errorOf(res);
    expect(error.code).toBe(code);
    expect(error.message).toMatch(message);
    expect((await countImportRows(db)).lab_files).toBe(0);
  });

  test('the plain HTML form gets a redirect back to the page with the reason', async () => {
    const { crewId, userId } = await makeImportCrew(db);
    const res = await handleUpload(db, {
      request: uploadRequest(PNG, { html: true }),
      locals: sessionOf(userId, crewId),
    });
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/imports?error=image_file');
    const ok = await handleUpload(db, {
      request: uploadRequest(bytesOf(CSV), { html: true }),
      locals: sessionOf(userId, crewId),
    });
    expect(ok.status).toBe(303);
    expect(ok.headers.get('location')).toMatch(/^\/imports\/[0-9a-f-]{36}$/);
  });

  test('a forged crew id in the body is refused and nothing is written for either crew', async () => {
    const mine = await makeImportCrew(db, 'Mine');
    const theirs = await makeImportCrew(db, 'Theirs');
    const res = await handleUpload(db, {
      request: uploadRequest(bytesOf(CSV), { extra: { crewId: theirs.crewId } }),
      locals: sessionOf(mine.userId, mine.crewId),
    });
    expect(res.status).toBe(400);
    expect((await errorOf(res)).fields.crewId).toBe('is not accepted here');
    expect((await countImportRows(db)).lab_files).toBe(0);
  });

  test.each([
    ['signed out', null, 401],
    ['a rider', 'rider' as Role, 403],
  ])('%s cannot upload', async (_name, role, status) => {
    const { crewId } = await makeImportCrew(db);
    const rider = await makeUser(db);
    await addMember(db, crewId, rider.id, 'rider');
    const locals = role === null ? { user: null, crew: null } : sessionOf(rider.id, crewId, role);
    const res = await handleUpload(db, { request: uploadRequest(bytesOf(CSV)), locals });
    expect(res.status).toBe(status);
    expect((await countImportRows(db)).lab_files).toBe(0);
  });

  test('a body that is not multipart is refused with 415', async () => {
    const { crewId, userId } = await makeImportCrew(db);
    const request = new Request('http://127.0.0.1/api/imports', {
      method: 'POST',
      headers: { 'content-type': 'text/csv', accept: 'application/json' },
      body: CSV,
    });
    const res = await handleUpload(db, { request, locals: sessionOf(userId, crewId) });
    expect(res.status).toBe(415);
  });
});

describe('POST /api/imports/:id/confirm', () => {
  async function uploaded(crewId: string, userId: string, text = CSV) {
    const res = await handleUpload(db, { request: uploadRequest(bytesOf(text)), locals: sessionOf(userId, crewId) });
    return ((await res.json()) as { labFileId: string }).labFileId;
  }
  const confirmRequest = (body: unknown) =>
    new Request('http://127.0.0.1/api/imports/x/confirm', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify(body),
    });

  test('writes a matched file (201) with its counts', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    await makeSample(db, crewId, machineId, userId, 'SW-1');
    const id = await uploaded(crewId, userId);
    const res = await handleConfirmJson(
      db,
      { request: confirmRequest({ decisions: {} }), locals: sessionOf(userId, crewId) },
      id,
    );
    expect(res.status).toBe(201);
    expect(await res.json()).toMatchObject({ samplesWritten: 1, readingsWritten: 3 });
  });

  test("a forged crew id in the body is refused; the other crew's file answers 404", async () => {
    const mine = await makeImportCrew(db, 'Mine');
    const theirs = await makeImportCrew(db, 'Theirs');
    await makeSample(db, theirs.crewId, theirs.machineId, theirs.userId, 'SW-1');
    const theirFile = await uploaded(theirs.crewId, theirs.userId);
    const before = await countImportRows(db);
    const forged = await handleConfirmJson(
      db,
      {
        request: confirmRequest({ crewId: theirs.crewId, decisions: {} }),
        locals: sessionOf(mine.userId, mine.crewId),
      },
      theirFile,
    );
    expect(forged.status).toBe(400);
    expect((await errorOf(forged)).fields.crewId).toMatch(/crew comes from your session/);
    const notMine = await handleConfirmJson(
      db,
      { request: confirmRequest({ decisions: {} }), locals: sessionOf(mine.userId, mine.crewId) },
      theirFile,
    );
    expect(notMine.status).toBe(404);
    expect(await countImportRows(db)).toEqual(before);
  });

  test('rows still in error are refused with 422 naming the line and column', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    await makeSample(db, crewId, machineId, userId, 'SW-1');
    const id = await uploaded(crewId, userId, 'Bottle,Sampled,Fe,Al,Si\nSW-1,2026-02-01,-4,5,9\n');
    const before = await countImportRows(db);
    const res = await handleConfirmJson(
      db,
      { request: confirmRequest({ decisions: {} }), locals: sessionOf(userId, crewId) },
      id,
    );
    expect(res.status).toBe(422);
    expect((await errorOf(res)).fields['row.2']).toMatch(/Line 2, column "Fe": "-4" is negative/);
    expect(await countImportRows(db)).toEqual(before);
  });

  test('the preview page form: "check" keeps the choices, "confirm" writes and redirects', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    const id = await uploaded(crewId, userId, 'Bottle,Sampled,Fe\nNEW-1,2026-02-01,30\n');
    const ctx = { request: new Request('http://127.0.0.1/'), locals: sessionOf(userId, crewId) };
    const refused = await handlePreviewPost(db, ctx, id, new URLSearchParams({ action: 'confirm' }));
    expect(refused.result.ok).toBe(false);
    if (!refused.result.ok)
      expect(refused.result.fields['row.2']).toMatch(/no sample of this crew has bottle code "NEW-1"/);
    const forged = await handlePreviewPost(
      db,
      ctx,
      id,
      new URLSearchParams({ action: 'confirm', crewId, 'row.2': `create:${machineId}` }),
    );
    expect(!forged.result.ok && forged.result.message).toMatch(/crew comes from your session/);
    expect((await countImportRows(db)).lab_imports).toBe(0);
    const done = await handlePreviewPost(
      db,
      ctx,
      id,
      new URLSearchParams({ action: 'confirm', 'row.2': `create:${machineId}` }),
    );
    expect(done.result.ok && done.result.value).toBeInstanceOf(Response);
    if (done.result.ok) expect(done.result.value?.headers.get('location')).toBe(`/imports/${id}?done=1`);
    expect((await countImportRows(db)).lab_imports).toBe(1);
  });
});
