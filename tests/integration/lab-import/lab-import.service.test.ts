import { readFileSync } from 'node:fs';
import path from 'node:path';
import { Kysely, PostgresDialect } from 'kysely';
import { CopyingClient } from '~/lib/db/copy';
import pg from 'pg';
import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import type { Database } from '~/lib/db/database';
import { MAX_LAB_FILE_BYTES } from '~/lib/lab-csv/lab-csv';
import { confirmLabImport, previewLabImport, saveLabProfile, storeLabFile } from '~/lib/lab-import/lab-import.service';
import { recomputeFindings } from '~/lib/findings/findings.service';
import { computeCheckSymbol } from '~/lib/samples/bottle-code';
import { openTestDb, TEST_DATABASE, truncateAll } from '../test-database';
import { bytesOf, countImportRows, makeImportCrew, makeSample } from './lab-import-fixtures';

const FIXTURES = path.resolve(__dirname, '../../fixtures/lab-csv');
const fixture = (name: string) => new Uint8Array(readFileSync(path.join(FIXTURES, name)));

const db: Kysely<Database> = openTestDb();
afterAll(async () => {
  await db.destroy();
});
beforeEach(async () => {
  await truncateAll(db);
});

const HEADER = 'Bottle,Sampled,Fe,Al,Si,Cu';
const csv = (...rows: string[]) => `${HEADER}\n${rows.join('\n')}\n`;

async function upload(crewId: string, userId: string, text: string | Uint8Array, fileName = 'report.csv') {
  const bytes = typeof text === 'string' ? bytesOf(text) : text;
  const stored = await storeLabFile(db, { crewId, userId, fileName, bytes });
  if (!stored.ok) throw new Error(`upload refused: ${stored.message}`);
  return stored.value.labFileId;
}

describe('storeLabFile: size and content checks, nothing written on refusal', () => {
  test.each([
    ['over 5 MiB', new Uint8Array(MAX_LAB_FILE_BYTES + 1).fill(0x41), 413, 'file_too_large'],
    ['a PNG image renamed .csv', fixture('bad-image.png'), 415, 'image_file'],
    ['a JPEG photo', fixture('bad-photo.jpg'), 415, 'image_file'],
    ['a spreadsheet', fixture('bad-spreadsheet.xlsx'), 415, 'not_csv_file'],
    ['a binary with NUL bytes', fixture('bad-binary-nul.bin'), 415, 'binary_file'],
    ['an empty file', new Uint8Array(0), 400, 'empty_file'],
  ])('%s is refused', async (_name, bytes, status, code) => {
    const { crewId, userId } = await makeImportCrew(db);
    const result = await storeLabFile(db, { crewId, userId, fileName: 'results.csv', bytes });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.status).toBe(status);
    expect(result.code).toBe(code);
    expect(result.message).toContain('results.csv');
    expect((await countImportRows(db)).lab_files).toBe(0);
  });

  test('keeps the raw bytes with their SHA-256, uploader and crew', async () => {
    const { crewId, userId } = await makeImportCrew(db);
    const text = csv('SW-1,2026-02-01,30,5,9,3');
    const id = await upload(crewId, userId, text, '../../etc/report.csv');
    const row = await db.selectFrom('lab_files').selectAll().where('id', '=', id).executeTakeFirstOrThrow();
    expect(row.content.toString('utf8')).toBe(text);
    // SHA-256 computed independently with the same input (node:crypto is FIPS 180-4 SHA-256).
    expect(row.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(row.crew_id).toBe(crewId);
    expect(row.uploaded_by).toBe(userId);
    expect(row.file_name).toBe('report.csv');
  });

  test('the same bytes again reuse the pending upload; after import they are "already imported" and write nothing', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    await makeSample(db, crewId, machineId, userId, 'SW-1');
    const text = csv('SW-1,2026-02-01,30,5,9,3');
    const first = await storeLabFile(db, { crewId, userId, fileName: 'a.csv', bytes: bytesOf(text) });
    const again = await storeLabFile(db, { crewId, userId, fileName: 'b.csv', bytes: bytesOf(text) });
    expect(first.ok && again.ok && again.value.labFileId === first.value.labFileId && again.value.status).toBe(
      'already-uploaded',
    );
    if (!first.ok) return;
    const confirmed = await confirmLabImport(db, { crewId, userId, labFileId: first.value.labFileId, decisions: {} });
    expect(confirmed.ok).toBe(true);
    const before = await countImportRows(db);
    const third = await storeLabFile(db, { crewId, userId, fileName: 'c.csv', bytes: bytesOf(text) });
    expect(third.ok).toBe(false);
    if (third.ok) return;
    expect(third.status).toBe(409);
    expect(third.code).toBe('already_imported');
    expect(third.message).toMatch(/already imported/);
    expect(await countImportRows(db)).toEqual(before);
    // Confirming the same file a second time is refused as well.
    const twice = await confirmLabImport(db, { crewId, userId, labFileId: first.value.labFileId, decisions: {} });
    expect(twice.ok || twice.code).toBe('already_imported');
    expect(await countImportRows(db)).toEqual(before);
  });

  test("another crew's identical file is its own upload", async () => {
    const a = await makeImportCrew(db, 'A');
    const b = await makeImportCrew(db, 'B');
    const text = csv('SW-1,2026-02-01,30,5,9,3');
    const idA = await upload(a.crewId, a.userId, text);
    const idB = await upload(b.crewId, b.userId, text);
    expect(idA).not.toBe(idB);
  });
});

describe('preview and matching', () => {
  test('matches bottle codes ignoring case, spaces and dashes', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    const sample = await makeSample(db, crewId, machineId, userId, 'SW-1041');
    const id = await upload(crewId, userId, csv('sw 10-41,2026-02-01,30,5,9,3'));
    const preview = await previewLabImport(db, { crewId, labFileId: id });
    expect(preview.ok).toBe(true);
    if (!preview.ok) return;
    expect(preview.value.rows[0]?.match).toMatchObject({ kind: 'matched', sampleId: sample.id });
    expect(preview.value.canConfirm).toBe(true);
  });

  test('a bottle of another crew is unknown, never matched, and cannot be written without a decision', async () => {
    const mine = await makeImportCrew(db, 'Mine');
    const theirs = await makeImportCrew(db, 'Theirs');
    await makeSample(db, theirs.crewId, theirs.machineId, theirs.userId, 'SW-7777');
    const id = await upload(mine.crewId, mine.userId, csv('SW-7777,2026-02-01,30,5,9,3'));
    const preview = await previewLabImport(db, { crewId: mine.crewId, labFileId: id });
    if (!preview.ok) throw new Error(preview.message);
    expect(preview.value.rows[0]?.match.kind).toBe('unknown');
    expect(preview.value.rows[0]?.needs).toMatch(
      /Line 2, column "Bottle": no sample of this crew has bottle code "SW-7777"/,
    );
    const before = await countImportRows(db);
    const refused = await confirmLabImport(db, {
      crewId: mine.crewId,
      userId: mine.userId,
      labFileId: id,
      decisions: {},
    });
    expect(refused.ok).toBe(false);
    expect(await countImportRows(db)).toEqual(before);
    // The other crew's sample is untouched.
    const theirSample = await db
      .selectFrom('samples')
      .select('state')
      .where('crew_id', '=', theirs.crewId)
      .executeTakeFirstOrThrow();
    expect(theirSample.state).toBe('shipped');
  });

  test('an issued code with a wrong check character is flagged as probably mistyped', async () => {
    const { crewId, userId } = await makeImportCrew(db);
    const data = 'K7MQ4X';
    const good = data + computeCheckSymbol(data);
    // Swap the two last data symbols: the check character catches every swap of neighbours.
    const swapped = `K7MQX4${computeCheckSymbol(data)}`;
    const id = await upload(crewId, userId, csv(`${swapped},2026-02-01,30,5,9,3`));
    const preview = await previewLabImport(db, { crewId, labFileId: id });
    if (!preview.ok) throw new Error(preview.message);
    const row = preview.value.rows[0]!;
    expect(row.match).toMatchObject({ kind: 'unknown' });
    expect(row.warnings.map((w) => w.message).join(' ')).toMatch(/check character/);
    expect(good).not.toBe(swapped);
  });

  test('a bottle code twice in one file is an error on the second line and the confirm is refused', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    await makeSample(db, crewId, machineId, userId, 'SW-1');
    const id = await upload(crewId, userId, csv('SW-1,2026-02-01,30,5,9,3', 'sw1,2026-02-01,31,5,9,3'));
    const before = await countImportRows(db);
    const refused = await confirmLabImport(db, { crewId, userId, labFileId: id, decisions: {} });
    expect(refused.ok).toBe(false);
    if (refused.ok) return;
    expect(refused.status).toBe(422);
    expect(refused.fields?.['row.3']).toMatch(/Line 3, column "Bottle".*already used on line 2/);
    expect(await countImportRows(db)).toEqual(before);
  });

  test('a confirm with rows still in error is refused and names row and column', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    await makeSample(db, crewId, machineId, userId, 'SW-1');
    await makeSample(db, crewId, machineId, userId, 'SW-2');
    const id = await upload(crewId, userId, csv('SW-1,2026-02-01,30,5,9,3', 'SW-2,2026-02-01,lots,5,9,3'));
    const before = await countImportRows(db);
    const refused = await confirmLabImport(db, { crewId, userId, labFileId: id, decisions: {} });
    expect(refused.ok).toBe(false);
    if (refused.ok) return;
    expect(refused.fields?.['row.3']).toMatch(/Line 3, column "Fe": "lots" is not a number/);
    expect(await countImportRows(db)).toEqual(before);
    // Skipping the row in error lets the rest through.
    const done = await confirmLabImport(db, { crewId, userId, labFileId: id, decisions: { '3': { action: 'skip' } } });
    expect(done.ok && done.value.samplesWritten).toBe(1);
  });

  test('a file-level error (no bottle column) blocks the confirm', async () => {
    const { crewId, userId } = await makeImportCrew(db);
    const id = await upload(crewId, userId, 'Jar,Fe,Al\nA1,3,4\n');
    const refused = await confirmLabImport(db, { crewId, userId, labFileId: id, decisions: {} });
    expect(refused.ok).toBe(false);
    expect((await countImportRows(db)).lab_imports).toBe(0);
  });

  test('a lab file of another crew answers not found (a forged file id)', async () => {
    const a = await makeImportCrew(db, 'A');
    const b = await makeImportCrew(db, 'B');
    await makeSample(db, b.crewId, b.machineId, b.userId, 'SW-1');
    const id = await upload(b.crewId, b.userId, csv('SW-1,2026-02-01,30,5,9,3'));
    const before = await countImportRows(db);
    const preview = await previewLabImport(db, { crewId: a.crewId, labFileId: id });
    expect(preview.ok || preview.status).toBe(404);
    const confirm = await confirmLabImport(db, { crewId: a.crewId, userId: a.userId, labFileId: id, decisions: {} });
    expect(confirm.ok || confirm.status).toBe(404);
    expect(await countImportRows(db)).toEqual(before);
  });
});

describe('confirm', () => {
  test('writes readings, moves samples to results in with an event, stores findings and an engine interval call', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    const codes = ['SW-1', 'SW-2', 'SW-3', 'SW-4'];
    for (const [i, code] of codes.entries()) {
      await makeSample(db, crewId, machineId, userId, code, {
        drawnOn: `2026-0${i + 1}-10`,
        odometer: 1000 * (i + 1),
        distanceOnOil: 1000,
      });
    }
    // Invented figures: a steady start, then aluminium far above the fixed limit on the last sample.
    const id = await upload(
      crewId,
      userId,
      csv(
        'SW-1,2026-01-10,30,4,8,3',
        'SW-2,2026-02-10,31,5,9,3',
        'SW-3,2026-03-10,29,4,8,3',
        'SW-4,2026-04-10,32,60,9,3',
      ),
    );
    const result = await confirmLabImport(db, { crewId, userId, labFileId: id, decisions: {} });
    if (!result.ok) throw new Error(result.message);
    expect(result.value).toMatchObject({
      samplesWritten: 4,
      readingsWritten: 16,
      samplesCreated: 0,
      samplesReplaced: 0,
    });
    const counts = await countImportRows(db);
    expect(counts).toMatchObject({ lab_imports: 1, readings: 16, sample_events: 4, results_in: 4, interval_calls: 4 });
    const last = await db
      .selectFrom('samples')
      .select('id')
      .where('bottle_code', '=', 'SW-4')
      .executeTakeFirstOrThrow();
    const findings = await db.selectFrom('findings').selectAll().where('sample_id', '=', last.id).execute();
    // Al 60 ppm is above the default fixed limit of 20 ppm (DEFAULT_FIXED_LIMITS, src/lib/analysis/rule-definitions.ts).
    expect(findings.some((f) => f.measurand === 'Al' && f.level === 'act')).toBe(true);
    const call = await db
      .selectFrom('interval_calls')
      .selectAll()
      .where('sample_id', '=', last.id)
      .executeTakeFirstOrThrow();
    expect(call).toMatchObject({ source: 'engine', call: 'shorten' });
  });

  test('a sample with results is updated only after "replace", and the old values go to its history', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    const sample = await makeSample(db, crewId, machineId, userId, 'SW-1');
    const first = await upload(crewId, userId, csv('SW-1,2026-02-01,30,5,9,3'));
    expect((await confirmLabImport(db, { crewId, userId, labFileId: first, decisions: {} })).ok).toBe(true);
    const second = await upload(crewId, userId, csv('SW-1,2026-02-01,44,6,10,4'));
    const before = await countImportRows(db);
    const refused = await confirmLabImport(db, { crewId, userId, labFileId: second, decisions: {} });
    expect(refused.ok).toBe(false);
    if (!refused.ok) expect(refused.fields?.['row.2']).toMatch(/already has 4 results.*replace/);
    expect(await countImportRows(db)).toEqual(before);
    const done = await confirmLabImport(db, {
      crewId,
      userId,
      labFileId: second,
      decisions: { '2': { action: 'replace' } },
    });
    if (!done.ok) throw new Error(done.message);
    expect(done.value.samplesReplaced).toBe(1);
    const fe = await db
      .selectFrom('readings')
      .select('value')
      .where('sample_id', '=', sample.id)
      .where('measurand', '=', 'Fe')
      .executeTakeFirstOrThrow();
    expect(fe.value).toBe(44);
    const history = await db.selectFrom('reading_history').selectAll().where('sample_id', '=', sample.id).execute();
    expect(history).toHaveLength(4);
    expect(history.find((h) => h.measurand === 'Fe')).toMatchObject({
      value: 30,
      replaced_by_import: done.value.importId,
    });
  });

  test("an unknown bottle can be created on a chosen machine of the crew, never on another crew's machine", async () => {
    const mine = await makeImportCrew(db, 'Mine');
    const theirs = await makeImportCrew(db, 'Theirs');
    const id = await upload(mine.crewId, mine.userId, csv('LAB-99,2026-02-01,30,5,9,3'));
    const forged = await confirmLabImport(db, {
      crewId: mine.crewId,
      userId: mine.userId,
      labFileId: id,
      decisions: { '2': { action: 'create', machineId: theirs.machineId } },
    });
    expect(forged.ok).toBe(false);
    if (!forged.ok) expect(forged.fields?.['row.2']).toMatch(/not one of this crew's machines/);
    expect((await countImportRows(db)).samples).toBe(0);
    const done = await confirmLabImport(db, {
      crewId: mine.crewId,
      userId: mine.userId,
      labFileId: id,
      decisions: { '2': { action: 'create', machineId: mine.machineId } },
    });
    if (!done.ok) throw new Error(done.message);
    expect(done.value.samplesCreated).toBe(1);
    const created = await db
      .selectFrom('samples')
      .selectAll()
      .where('bottle_code_norm', '=', 'LAB99')
      .executeTakeFirstOrThrow();
    expect(created).toMatchObject({
      crew_id: mine.crewId,
      machine_id: mine.machineId,
      state: 'results_in',
      drawn_on: '2026-02-01',
    });
  });

  test('a failure after the readings insert leaves no trace of the import', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    await makeSample(db, crewId, machineId, userId, 'SW-1');
    const id = await upload(crewId, userId, csv('SW-1,2026-02-01,30,5,9,3', 'NEW-1,2026-02-01,30,5,9,3'));
    const before = await countImportRows(db);
    let readingsSeenInside = 0;
    await expect(
      confirmLabImport(
        db,
        { crewId, userId, labFileId: id, decisions: { '3': { action: 'create', machineId } } },
        {
          afterReadings: async (trx) => {
            const t = trx as Kysely<Database>;
            readingsSeenInside = (await t.selectFrom('readings').select('sample_id').execute()).length;
            throw new Error('connection lost');
          },
        },
      ),
    ).rejects.toThrow('connection lost');
    expect(readingsSeenInside).toBe(8);
    expect(await countImportRows(db)).toEqual(before);
    const sample = await db
      .selectFrom('samples')
      .select('state')
      .where('bottle_code', '=', 'SW-1')
      .executeTakeFirstOrThrow();
    expect(sample.state).toBe('shipped');
  });

  test('a lost database connection mid-transaction writes nothing', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    await makeSample(db, crewId, machineId, userId, 'SW-1');
    const id = await upload(crewId, userId, csv('SW-1,2026-02-01,30,5,9,3'));
    const before = await countImportRows(db);
    // A pool of its own whose clients swallow the "terminated" event the killed connection emits afterwards.
    const pool = new pg.Pool({ connectionString: TEST_DATABASE.url(), max: 2, Client: CopyingClient });
    pool.on('connect', (client) => client.on('error', () => {}));
    pool.on('error', () => {});
    const fragile = new Kysely<Database>({ dialect: new PostgresDialect({ pool }) });
    await expect(
      confirmLabImport(
        fragile,
        { crewId, userId, labFileId: id, decisions: {} },
        {
          // The server ends this very backend, as a crash or restart would.
          afterReadings: async (trx) => {
            const { sql } = await import('kysely');
            await sql`select pg_terminate_backend(pg_backend_pid())`.execute(trx as Kysely<Database>);
          },
        },
      ),
    ).rejects.toThrow();
    await fragile.destroy();
    expect(await countImportRows(db)).toEqual(before);
  });
});

describe('lab profiles', () => {
  test('a saved mapping is applied automatically when the same header comes again', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    await makeSample(db, crewId, machineId, userId, 'SW-1');
    await makeSample(db, crewId, machineId, userId, 'SW-2');
    const text = (code: string) => `Jar,Drawn,Fe,Alu\n${code},2026-02-01,30,5\n`;
    const first = await upload(crewId, userId, text('SW-1'));
    const before = await previewLabImport(db, { crewId, labFileId: first });
    if (!before.ok) throw new Error(before.message);
    expect(before.value.canConfirm).toBe(false);
    const jar = before.value.columns.findIndex((c) => c.header === 'Jar');
    const alu = before.value.columns.findIndex((c) => c.header === 'Alu');
    const saved = await saveLabProfile(db, {
      crewId,
      userId,
      labFileId: first,
      name: 'Jar lab',
      targets: { [jar]: 'bottle', [alu]: 'Al' },
    });
    expect(saved.ok).toBe(true);
    const second = await upload(crewId, userId, text('SW-2'));
    const preview = await previewLabImport(db, { crewId, labFileId: second });
    if (!preview.ok) throw new Error(preview.message);
    expect(preview.value.profile?.name).toBe('Jar lab');
    expect(preview.value.rows[0]?.readings.Al).toEqual({ value: 5 });
    expect(preview.value.canConfirm).toBe(true);
  });

  test.each([
    ['two columns on one measurand', { 2: 'Fe', 3: 'Fe' }, /both mapped to Fe/],
    ['no bottle column', { 0: 'ignore' }, /Bottle code/],
  ])('a profile with %s is refused', async (_name, targets, message) => {
    const { crewId, userId } = await makeImportCrew(db);
    const id = await upload(crewId, userId, csv('SW-1,2026-02-01,30,5,9,3'));
    const saved = await saveLabProfile(db, { crewId, userId, labFileId: id, name: 'x', targets: targets as never });
    expect(saved.ok).toBe(false);
    if (!saved.ok) expect(Object.values(saved.fields ?? {}).join(' ')).toMatch(message);
    expect(await db.selectFrom('lab_profiles').selectAll().execute()).toHaveLength(0);
  });
});

describe('recomputeFindings', () => {
  test('recomputes one sample against the earlier accepted samples and is idempotent', async () => {
    const { crewId, userId, machineId } = await makeImportCrew(db);
    for (let i = 1; i <= 4; i++)
      await makeSample(db, crewId, machineId, userId, `SW-${i}`, { drawnOn: `2026-0${i}-01`, odometer: i * 1000 });
    const id = await upload(
      crewId,
      userId,
      csv('SW-1,,30,4,8,3', 'SW-2,,31,5,9,3', 'SW-3,,29,4,8,3', 'SW-4,,32,60,9,3'),
    );
    expect((await confirmLabImport(db, { crewId, userId, labFileId: id, decisions: {} })).ok).toBe(true);
    const last = await db
      .selectFrom('samples')
      .select('id')
      .where('bottle_code', '=', 'SW-4')
      .executeTakeFirstOrThrow();
    const before = await db
      .selectFrom('findings')
      .select(['rule_id', 'level', 'measurand'])
      .where('sample_id', '=', last.id)
      .orderBy('rule_id')
      .execute();
    const n = await db.transaction().execute((trx) => recomputeFindings(trx, last.id));
    const after = await db
      .selectFrom('findings')
      .select(['rule_id', 'level', 'measurand'])
      .where('sample_id', '=', last.id)
      .orderBy('rule_id')
      .execute();
    expect(n).toBe(after.length);
    expect(after).toEqual(before);
    expect(await db.selectFrom('interval_calls').selectAll().where('sample_id', '=', last.id).execute()).toHaveLength(
      1,
    );
  });
});

describe("units: the engine works in the machine's own meter, the database in km", () => {
  test('a machine metered in miles gets its call in miles and stored in km', async () => {
    const { crewId, userId } = await makeImportCrew(db);
    // 3,000 mi maximum and 2,500 mi on this oil, stored as km (1 mi = 1.609344 km, exact, NIST SP 811).
    const machine = await db
      .insertInto('machines')
      .values({
        crew_id: crewId,
        owner_user_id: userId,
        name: 'Mile bike',
        engine_layout: 'single',
        cooling: 'air',
        meter: 'mi',
        recommended_grades: JSON.stringify([]),
        max_interval_distance: 3000 * 1.609344,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const sample = await makeSample(db, crewId, machine.id, userId, 'MI-1', {
      odometer: 10_000 * 1.609344,
      distanceOnOil: 2500 * 1.609344,
    });
    await db
      .insertInto('readings')
      .values({ sample_id: sample.id, measurand: 'Fe', value: 10, qualifier: null, lab_import_id: null })
      .execute();
    await db.transaction().execute((trx) => recomputeFindings(trx, sample.id));
    const call = await db
      .selectFrom('interval_calls')
      .selectAll()
      .where('sample_id', '=', sample.id)
      .executeTakeFirstOrThrow();
    // Building baseline: hold at the 2,500 mi it ran (a multiple of the 100 mi step), due at 12,500 mi.
    expect(call.call).toBe('hold');
    expect(call.next_interval).toBeCloseTo(2500 * 1.609344, 6);
    expect(call.next_sample_odometer).toBeCloseTo(12_500 * 1.609344, 6);
  });
});
