import { afterAll, beforeEach, describe, expect, test } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { PNG } from 'pngjs';
import { openTestDb, truncateAll } from '../test-database';
import { countRiderRows, makeActor, MACHINE_450 } from '../rider-fixtures';
import { collectMachineForm } from '~/lib/machines/machines';
import { readFormObject } from '~/lib/http/result';
import { createMachine } from '~/lib/machines/machines.service';
import { createOilChange, listOilChanges } from '~/lib/oil-changes/oil-changes.service';
import { preparePhoto } from '~/lib/photos/photos';
import { photoPath } from '~/lib/photos/photos.storage';
import { getPhotoForMember, uploadPhoto } from '~/lib/photos/photos.service';

const db = openTestDb();
const dir = mkdtempSync(path.join(os.tmpdir(), 'sumpwise-photos-'));
afterAll(async () => { await db.destroy(); rmSync(dir, { recursive: true, force: true }); });
beforeEach(() => truncateAll(db));

function pngBytes(w = 3, h = 2): Uint8Array {
  const png = new PNG({ width: w, height: h });
  png.data.fill(200);
  return PNG.sync.write(png);
}

describe('photos', () => {
  test('stored by SHA-256 under the upload folder, with type and size read from the bytes', async () => {
    const rider = await makeActor(db);
    const bytes = pngBytes(40, 30);
    const r = await uploadPhoto(db, rider, bytes, 'cover-bolts.jpg', dir);
    if (!r.ok) throw new Error(JSON.stringify(r));
    expect(r.value.content_type).toBe('image/png');
    expect([r.value.width, r.value.height]).toEqual([40, 30]);
    expect(r.value.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(readFileSync(photoPath(dir, r.value.sha256)).equals(Buffer.from(bytes))).toBe(true);
  });

  test.each([
    { name: 'a text file renamed .jpg', bytes: () => new TextEncoder().encode('definitely not a photo\n'), fileName: 'bolts.jpg', status: 415, message: /not a photo.*whatever its name says/ },
    { name: 'a 40 MB upload', bytes: () => { const b = new Uint8Array(40 * 1024 * 1024); b.set([0xff, 0xd8, 0xff]); return b; }, fileName: 'huge.jpg', status: 413, message: /40\.0 MB; photos can be at most 10 MB/ },
    { name: 'an empty file', bytes: () => new Uint8Array(0), fileName: 'empty.png', status: 400, message: /is empty/ },
  ])('$name is refused with a clear message and writes nothing', async ({ bytes, fileName, status, message }) => {
    const rider = await makeActor(db);
    const r = await uploadPhoto(db, rider, bytes(), fileName, dir);
    expect(r.ok ? 200 : r.status).toBe(status);
    if (!r.ok) expect(r.fields['file']).toMatch(message);
    expect((await countRiderRows(db)).photos).toBe(0);
  });

  test('an uploaded photo attaches to the oil change; only crew members can fetch it', async () => {
    const rider = await makeActor(db);
    const stranger = await makeActor(db, 'lead', 'Elsewhere');
    const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
    if (!m.ok) throw new Error('setup');
    const p = await uploadPhoto(db, rider, pngBytes(), 'a.png', dir);
    if (!p.ok) throw new Error('upload');
    const oc = await createOilChange(db, rider, m.value.id, { changedOn: '2025-01-01', odometer: '100', saeGrade: '10W-40', photoIds: [p.value.id] });
    expect(oc.ok).toBe(true);
    const list = await listOilChanges(db, rider, m.value.id);
    if (!list.ok) throw new Error('list');
    expect(list.value[0]!.photos.map((x) => x.id)).toEqual([p.value.id]);
    expect((await getPhotoForMember(db, [rider.membership], p.value.id)).ok).toBe(true);
    const denied = await getPhotoForMember(db, [stranger.membership], p.value.id);
    expect(denied.ok ? 200 : denied.status).toBe(404);
    // Used once, it cannot be attached to a second oil change.
    const again = await createOilChange(db, rider, m.value.id, { changedOn: '2025-02-01', odometer: '200', saeGrade: '10W-40', photoIds: [p.value.id] });
    expect(again.ok).toBe(false);
  });

  test('photos from a plain form post are stored with the oil change in one transaction', async () => {
    const rider = await makeActor(db);
    const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
    if (!m.ok) throw new Error('setup');
    const prepared = preparePhoto(pngBytes(5, 5), 'x.png');
    if (!prepared.ok) throw new Error('prepare');
    const oc = await createOilChange(db, rider, m.value.id, { changedOn: '2025-01-01', odometer: '100', saeGrade: '10W-40' }, { newPhotos: [prepared.photo], uploadDir: dir });
    expect(oc.ok).toBe(true);
    expect((await countRiderRows(db)).photos).toBe(1);
  });

  test('photos from a plain form post that would pass the crew quota are refused with a sentence, and no oil change is written', async () => {
    const rider = await makeActor(db);
    const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
    if (!m.ok) throw new Error('setup');
    const prepared = preparePhoto(pngBytes(5, 5), 'x.png');
    if (!prepared.ok) throw new Error('prepare');
    const quotaBytes = prepared.photo.byteSize - 1;
    const oc = await createOilChange(db, rider, m.value.id, { changedOn: '2025-01-01', odometer: '100', saeGrade: '10W-40' }, { newPhotos: [prepared.photo], uploadDir: dir, quotaBytes });
    expect(oc).toMatchObject({ ok: false, status: 413, code: 'quota_exceeded' });
    expect(oc.ok ? '' : oc.fields?.photos).toMatch(/for photos and lab files, so this file was not kept/);
    expect(await countRiderRows(db)).toMatchObject({ photos: 0, oil_changes: 0 });
  });
});
