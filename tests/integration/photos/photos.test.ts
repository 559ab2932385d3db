// Photos through both stores against real servers (never a mock): the disk store on a temp folder, and the
// S3 store on the local fake (s3rver) the app runs in development and tests.
import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import { createHash, randomFillSync } from 'node:crypto';
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { buffer } from 'node:stream/consumers';
import { PNG } from 'pngjs';
import { openTestDb, truncateAll } from '../test-database';
import { countRiderRows, makeActor, MACHINE_450 } from '../rider-fixtures';
import { collectMachineForm } from '~/lib/machines/machines';
import { readFormObject } from '~/lib/http/result';
import { createMachine } from '~/lib/machines/machines.service';
import { createOilChange, listOilChanges } from '~/lib/oil-changes/oil-changes.service';
import { preparePhoto } from '~/lib/photos/photos';
import { photoKey, PhotoStorageError, type PhotoStore } from '~/lib/photos/photo-store';
import { createDiskPhotoStore } from '~/lib/photos/photos.storage';
import { createS3PhotoStore } from '~/lib/photos/photos.s3-storage';
import { getPhotoForMember, uploadPhoto } from '~/lib/photos/photos.service';
import { startLocalObjectStore, type LocalObjectStore } from '../../../scripts/lib/object-store';
import { freePort } from '../../../scripts/lib/processes';

const db = openTestDb();
const root = mkdtempSync(path.join(os.tmpdir(), 'sumpwise-photos-'));
// Staging goes to os.tmpdir(); a private one shows that a refused upload leaves no temp file behind.
const tempDir = path.join(root, 'tmp');
const savedTmp = process.env.TMPDIR;
let fake: LocalObjectStore;
const BUCKET = 'sumpwise-photos-test';
const s3Settings = (endpoint: string) => ({
  endpoint,
  region: 'us-east-1',
  bucket: BUCKET,
  accessKeyId: 'S3RVER',
  secretAccessKey: 'S3RVER',
  forcePathStyle: true,
});

beforeAll(async () => {
  rmSync(tempDir, { recursive: true, force: true });
  await import('node:fs/promises').then((fs) => fs.mkdir(tempDir, { recursive: true }));
  process.env.TMPDIR = tempDir;
  fake = await startLocalObjectStore({ port: await freePort(), directory: path.join(root, 's3'), bucket: BUCKET });
});
afterAll(async () => {
  process.env.TMPDIR = savedTmp;
  await fake?.close();
  await db.destroy();
  rmSync(root, { recursive: true, force: true });
});
beforeEach(() => truncateAll(db));

function pngBytes(w = 3, h = 2): Uint8Array {
  const png = new PNG({ width: w, height: h });
  png.data.fill(200);
  return PNG.sync.write(png);
}

/** A PNG of random pixels (does not compress): 1,200 × 1,200 RGBA is about 5.5 MB. */
function noisyPng(side: number): Buffer {
  const png = new PNG({ width: side, height: side });
  randomFillSync(png.data);
  return PNG.sync.write(png);
}

/** The bytes as a stream of 64 KB chunks, the way a request body arrives. */
function chunked(bytes: Uint8Array, size = 64 * 1024): Readable {
  return Readable.from(
    (function* () {
      for (let i = 0; i < bytes.byteLength; i += size) yield Buffer.from(bytes.subarray(i, i + size));
    })(),
  );
}

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');
const leftoverTempFiles = () => readdirSync(tempDir).filter((f) => f.startsWith('sumpwise-photo-'));

const stores: { name: string; make: () => PhotoStore }[] = [
  { name: 'disk', make: () => createDiskPhotoStore(path.join(root, 'disk')) },
  { name: 's3 (local fake)', make: () => createS3PhotoStore(s3Settings(fake.endpoint)) },
];

describe.each(stores)('photos in the $name store', ({ make }) => {
  test('stored by SHA-256, with type and size read from the bytes, and read back as a stream', async () => {
    const store = make();
    const rider = await makeActor(db);
    const bytes = pngBytes(40, 30);
    const r = await uploadPhoto(db, rider, bytes, 'cover-bolts.jpg', store);
    if (!r.ok) throw new Error(JSON.stringify(r));
    expect(r.value.content_type).toBe('image/png');
    expect([r.value.width, r.value.height]).toEqual([40, 30]);
    expect(r.value.sha256).toBe(sha256(bytes));
    const got = await store.get(photoKey(r.value.sha256));
    expect(got?.byteSize).toBe(bytes.byteLength);
    expect((await buffer(got!.body)).equals(Buffer.from(bytes))).toBe(true);
    expect(leftoverTempFiles()).toEqual([]);
  });

  test('a 5 MB+ photo streams in 64 KB chunks and comes back byte for byte', async () => {
    const store = make();
    const rider = await makeActor(db);
    const bytes = noisyPng(1200);
    expect(bytes.byteLength).toBeGreaterThan(5 * 1024 * 1024);
    const r = await uploadPhoto(db, rider, chunked(bytes), 'big.png', store);
    if (!r.ok) throw new Error(JSON.stringify(r));
    expect(r.value.byte_size).toBe(bytes.byteLength);
    expect([r.value.width, r.value.height]).toEqual([1200, 1200]);
    const got = await store.get(photoKey(r.value.sha256));
    expect(got?.byteSize).toBe(bytes.byteLength);
    expect(sha256(await buffer(got!.body))).toBe(sha256(bytes));
    expect(leftoverTempFiles()).toEqual([]);
  }, 60_000);

  test('the same picture twice is kept once (content-hash key) and both rows point at it', async () => {
    const store = make();
    const rider = await makeActor(db);
    const bytes = pngBytes(9, 9);
    const a = await uploadPhoto(db, rider, bytes, 'a.png', store);
    const b = await uploadPhoto(db, rider, chunked(bytes, 7), 'b.png', store);
    if (!a.ok || !b.ok) throw new Error('upload');
    expect(a.value.sha256).toBe(b.value.sha256);
    expect(await store.exists(photoKey(a.value.sha256))).toBe(true);
    await store.delete(photoKey(a.value.sha256));
    expect(await store.exists(photoKey(a.value.sha256))).toBe(false);
    expect(await store.get(photoKey(a.value.sha256))).toBeNull();
    // Deleting what is not there is no error.
    await store.delete(photoKey(a.value.sha256));
  });

  test.each([
    // A forged name or browser type changes nothing: the first bytes decide (JPEG/PNG signatures, from memory of the formats).
    {
      name: 'a text file named .jpg',
      bytes: () => new TextEncoder().encode('definitely not a photo, though the name says so\n'.repeat(4)),
      fileName: 'bolts.jpg',
      status: 415,
      message: /not a photo.*whatever its name says/,
    },
    {
      name: 'an HTML page named .png (stopped after its first bytes)',
      bytes: () => new TextEncoder().encode('<!doctype html><script>alert(1)</script>'.repeat(50_000)),
      fileName: 'x.png',
      status: 415,
      message: /not a photo/,
    },
    {
      name: 'a 40 MB upload with a JPEG signature',
      bytes: () => {
        const b = new Uint8Array(40 * 1024 * 1024);
        b.set([0xff, 0xd8, 0xff]);
        return b;
      },
      fileName: 'huge.jpg',
      status: 413,
      message: /40\.0 MB; photos can be at most 10 MB/,
    },
    { name: 'an empty file', bytes: () => new Uint8Array(0), fileName: 'empty.png', status: 400, message: /is empty/ },
  ])(
    '$name is refused with a clear message, and nothing is written anywhere',
    async ({ bytes, fileName, status, message }) => {
      const store = make();
      const rider = await makeActor(db);
      const b = bytes();
      const r = await uploadPhoto(db, rider, chunked(b), fileName, store);
      expect(r.ok ? 200 : r.status).toBe(status);
      if (!r.ok) expect(r.fields['file']).toMatch(message);
      expect((await countRiderRows(db)).photos).toBe(0);
      expect(await store.exists(photoKey(sha256(b)))).toBe(false);
      expect(leftoverTempFiles()).toEqual([]);
    },
    60_000,
  );

  test('photos from a plain form post are stored with the oil change in one transaction', async () => {
    const store = make();
    const rider = await makeActor(db);
    const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
    if (!m.ok) throw new Error('setup');
    const prepared = preparePhoto(pngBytes(5, 5), 'x.png');
    if (!prepared.ok) throw new Error('prepare');
    const oc = await createOilChange(
      db,
      rider,
      m.value.id,
      { changedOn: '2025-01-01', odometer: '100', saeGrade: '10W-40' },
      { newPhotos: [prepared.photo], photoStore: store },
    );
    expect(oc.ok).toBe(true);
    expect((await countRiderRows(db)).photos).toBe(1);
    expect(await store.exists(photoKey(prepared.photo.sha256))).toBe(true);
  });
});

describe('photos, whatever the store', () => {
  test('an object store that does not answer: a storage error, no photo row, no temp file', async () => {
    const closed = createS3PhotoStore(s3Settings(`http://127.0.0.1:${await freePort()}`));
    const rider = await makeActor(db);
    await expect(uploadPhoto(db, rider, pngBytes(), 'a.png', closed)).rejects.toMatchObject({
      name: 'PhotoStorageError',
      reason: 'unavailable',
    });
    expect((await countRiderRows(db)).photos).toBe(0);
    expect(leftoverTempFiles()).toEqual([]);
  });

  test('a key that is not a content hash never reaches the disk', async () => {
    const store = createDiskPhotoStore(path.join(root, 'disk'));
    await expect(store.get('../../etc/passwd')).rejects.toThrow(RangeError);
    expect(() => photoKey('../x')).toThrow(RangeError);
    expect(new PhotoStorageError('full', 'ENOSPC').message).toMatch(/no room left/);
  });

  test('an uploaded photo attaches to the oil change; only crew members can fetch it', async () => {
    const store = createS3PhotoStore(s3Settings(fake.endpoint));
    const rider = await makeActor(db);
    const stranger = await makeActor(db, 'lead', 'Elsewhere');
    const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
    if (!m.ok) throw new Error('setup');
    const p = await uploadPhoto(db, rider, pngBytes(), 'a.png', store);
    if (!p.ok) throw new Error('upload');
    const oc = await createOilChange(db, rider, m.value.id, {
      changedOn: '2025-01-01',
      odometer: '100',
      saeGrade: '10W-40',
      photoIds: [p.value.id],
    });
    expect(oc.ok).toBe(true);
    const list = await listOilChanges(db, rider, m.value.id);
    if (!list.ok) throw new Error('list');
    expect(list.value[0]!.photos.map((x) => x.id)).toEqual([p.value.id]);
    expect((await getPhotoForMember(db, [rider.membership], p.value.id)).ok).toBe(true);
    const denied = await getPhotoForMember(db, [stranger.membership], p.value.id);
    expect(denied.ok ? 200 : denied.status).toBe(404);
    // Used once, it cannot be attached to a second oil change.
    const again = await createOilChange(db, rider, m.value.id, {
      changedOn: '2025-02-01',
      odometer: '200',
      saeGrade: '10W-40',
      photoIds: [p.value.id],
    });
    expect(again.ok).toBe(false);
  });

  test('a mechanic adds no photos, and the refused upload is still read to its end', async () => {
    const store = createS3PhotoStore(s3Settings(fake.endpoint));
    const lead = await makeActor(db, 'lead');
    const { addActor } = await import('../rider-fixtures');
    const mechanic = await addActor(db, lead, 'mechanic');
    const source = chunked(pngBytes(4, 4), 10);
    const r = await uploadPhoto(db, mechanic, source, 'a.png', store);
    expect(r.ok ? 200 : r.status).toBe(403);
    await new Promise((resolve) => setImmediate(resolve));
    expect(source.readableEnded || source.destroyed).toBe(true);
  });

  test('photos from a plain form post that would pass the crew quota are refused with a sentence, and no oil change is written', async () => {
    const store = createS3PhotoStore(s3Settings(fake.endpoint));
    const rider = await makeActor(db);
    const m = await createMachine(db, rider, collectMachineForm(readFormObject(new URLSearchParams(MACHINE_450))), 'C');
    if (!m.ok) throw new Error('setup');
    const prepared = preparePhoto(pngBytes(5, 5), 'x.png');
    if (!prepared.ok) throw new Error('prepare');
    const quotaBytes = prepared.photo.byteSize - 1;
    const oc = await createOilChange(
      db,
      rider,
      m.value.id,
      { changedOn: '2025-01-01', odometer: '100', saeGrade: '10W-40' },
      { newPhotos: [prepared.photo], photoStore: store, quotaBytes },
    );
    expect(oc).toMatchObject({ ok: false, status: 413, code: 'quota_exceeded' });
    expect(oc.ok ? '' : oc.fields?.photos).toMatch(/for photos and lab files, so this file was not kept/);
    expect(await countRiderRows(db)).toMatchObject({ photos: 0, oil_changes: 0 });
  });
});
