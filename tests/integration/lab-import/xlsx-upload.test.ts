// An .xlsx lab report through the lab import page's upload: checked by content (a workbook is a ZIP archive),
// previewed on the sheet with the lab header (or the sheet a saved profile names), confirmed like a CSV.
import ExcelJS from 'exceljs';
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type { CrewMembership, SessionUser } from '~/lib/auth/types';
import { handleUpload } from '~/lib/lab-import/lab-import.routes';
import { confirmLabImport, previewLabImport, saveLabProfile } from '~/lib/lab-import/lab-import.service';
import { openTestDb, truncateAll } from '../test-database';
import { makeImportCrew, makeSample } from './lab-import-fixtures';

const db = openTestDb();
afterAll(async () => {
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

function locals(userId: string, crewId: string) {
  const user: SessionUser = {
    id: userId,
    email: 'x@example.test',
    displayName: 'X',
    emailVerified: true,
    distanceUnit: 'km',
    lengthUnit: 'mm',
    temperatureUnit: 'C',
  };
  const crew: CrewMembership = { crewId, crewName: 'Valley school', role: 'lead' };
  return { user, crew };
}

function upload(bytes: Uint8Array, name: string): Request {
  const form = new FormData();
  form.append('file', new Blob([bytes as BlobPart]), name);
  return new Request('http://127.0.0.1/api/imports', {
    method: 'POST',
    headers: { accept: 'application/json' },
    body: form,
  });
}

async function workbook(sheets: { name: string; rows: ExcelJS.CellValue[][] }[]): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  for (const s of sheets) {
    const ws = wb.addWorksheet(s.name);
    for (const r of s.rows) ws.addRow(r);
  }
  return new Uint8Array(await wb.xlsx.writeBuffer());
}

describe('an .xlsx upload', () => {
  test('is stored, previewed from its typed cells and confirmed like a CSV', async () => {
    const { crewId, userId } = await makeImportCrew(db);
    const { machineId } = { machineId: (await db.selectFrom('machines').select('id').executeTakeFirstOrThrow()).id };
    await makeSample(db, crewId, machineId, userId, 'XU-1');
    const bytes = await workbook([
      {
        name: 'Results',
        rows: [['Lab title'], [], ['Bottle', 'Sampled', 'Fe', 'Cu'], ['XU-1', new Date(Date.UTC(2026, 1, 1)), 21, 3.5]],
      },
    ]);
    const res = await handleUpload(db, { request: upload(bytes, 'report.xlsx'), locals: locals(userId, crewId) });
    expect(res.status).toBe(201);
    const { labFileId } = (await res.json()) as { labFileId: string };
    const preview = await previewLabImport(db, { crewId, labFileId });
    if (!preview.ok) throw new Error(preview.message);
    expect(preview.value.sheet).toBe('Results');
    expect(preview.value.rows.map((r) => [r.line, r.bottle, r.sampled, r.readings])).toEqual([
      [4, 'XU-1', '2026-02-01', { Fe: { value: 21 }, Cu: { value: 3.5 } }],
    ]);
    expect(preview.value.canConfirm).toBe(true);
    const confirmed = await confirmLabImport(db, { crewId, userId, labFileId, decisions: {} });
    expect(confirmed.ok && confirmed.value.readingsWritten).toBe(2);
    // The raw workbook is kept as uploaded.
    const stored = await db.selectFrom('lab_files').select('content').executeTakeFirstOrThrow();
    expect(new Uint8Array(stored.content)).toEqual(bytes);
  });

  test('a saved lab profile names the sheet its workbooks are read on', async () => {
    const { crewId, userId } = await makeImportCrew(db);
    const bytes = await workbook([
      {
        name: 'Summary',
        rows: [
          ['Bottle', 'Fe'],
          ['S-1', 1],
        ],
      },
      {
        name: 'Detail',
        rows: [
          ['Bottle', 'Fe', 'Cu'],
          ['D-1', 2, 3],
        ],
      },
    ]);
    const res = await handleUpload(db, { request: upload(bytes, 'two-sheets.xlsx'), locals: locals(userId, crewId) });
    const { labFileId } = (await res.json()) as { labFileId: string };
    const first = await previewLabImport(db, { crewId, labFileId });
    expect(first.ok && first.value.sheet).toBe('Summary');
    // Nothing in the file says "Detail" is the one; a profile saved from a Detail preview does.
    await db
      .insertInto('lab_profiles')
      .values({
        crew_id: crewId,
        name: 'Detail sheet',
        header_signature: 'x',
        mapping: JSON.stringify({}),
        sheet_name: 'Detail',
        created_by: userId,
      })
      .execute();
    const second = await previewLabImport(db, { crewId, labFileId });
    expect(second.ok && second.value.sheet).toBe('Detail');
    expect(second.ok && second.value.rows[0]?.bottle).toBe('D-1');
    const saved = await saveLabProfile(db, { crewId, userId, labFileId, name: 'Detail layout', targets: {} });
    expect(saved.ok).toBe(true);
    const profile = await db
      .selectFrom('lab_profiles')
      .select(['name', 'sheet_name'])
      .where('name', '=', 'Detail layout')
      .executeTakeFirstOrThrow();
    expect(profile.sheet_name).toBe('Detail');
  });

  test.each([
    [
      'a damaged workbook (a ZIP start and nothing after it)',
      new Uint8Array([0x50, 0x4b, 0x03, 0x04, ...new Array(60).fill(7)]),
      'report.xlsx',
      415,
    ],
    ['a workbook named .csv is still read as a workbook (content decides)', null, 'report.csv', 201],
  ])('%s', async (_what, bytes, name, status) => {
    const { crewId, userId } = await makeImportCrew(db);
    const body =
      bytes ??
      (await workbook([
        {
          name: 'S',
          rows: [
            ['Bottle', 'Fe'],
            ['A', 1],
          ],
        },
      ]));
    const res = await handleUpload(db, { request: upload(body, name), locals: locals(userId, crewId) });
    expect(res.status).toBe(status);
    const files = await db.selectFrom('lab_files').selectAll().execute();
    expect(files).toHaveLength(status === 201 ? 1 : 0);
  });
});
