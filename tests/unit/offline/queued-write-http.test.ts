import { describe, expect, test } from 'vitest';
import { PNG } from 'pngjs';
import { refuseQueuedWriteOfOtherCrew, QUEUED_CREW_HEADER } from '~/lib/http/queued-write';
import { existsSync } from 'node:fs';
import {
  OIL_CHANGE_UPLOAD_MAX_BYTES,
  withOilChangeUpload,
  type OilChangeUpload,
} from '~/lib/oil-changes/oil-change-upload';

const A = { crewId: 'crew-a', crewName: 'Valley School', role: 'rider' as const };
const B = { crewId: 'crew-b', crewName: 'Own crew', role: 'lead' as const };

function png(): Uint8Array<ArrayBuffer> {
  const p = new PNG({ width: 8, height: 6 });
  p.data.fill(200);
  return new Uint8Array(PNG.sync.write(p));
}

describe('a queued write lands only in the crew it was written in', () => {
  test.each([
    ['no header (a plain request)', null, A, null],
    ['the current crew', 'crew-a', A, null],
    ['another crew of the rider', 'crew-b', A, 'other_crew'],
    ['a crew the rider left (or a forged id)', 'crew-z', A, 'not_a_member'],
    ['a 100 KB forged header', 'x'.repeat(100_000), A, 'not_a_member'],
  ])('%s', async (_name, header, crew, code) => {
    const req = new Request('http://local/api/samples', {
      method: 'POST',
      headers: header === null ? {} : { [QUEUED_CREW_HEADER]: header },
    });
    const res = refuseQueuedWriteOfOtherCrew(req, crew, [A, B]);
    if (code === null) expect(res).toBeNull();
    else {
      expect(res!.status).toBe(409);
      const body = (await res!.json()) as { error: { code: string; message: string } };
      expect(body.error.code).toBe(code);
      expect(body.error.message.length).toBeGreaterThan(20);
      expect(body.error.message).not.toContain('x'.repeat(50));
    }
  });
});

/** Reads an upload and notes whether each staged photo's temp file was there while it was in use. */
async function readOilChangeUpload(
  request: Request,
): Promise<OilChangeUpload & { tempFiles: string[]; present: boolean[] }> {
  let present: boolean[] = [];
  const upload = await withOilChangeUpload(request, async (u) => {
    present = u.ok ? u.photos.map((p) => existsSync(p.tempPath)) : [];
    return u;
  });
  return { ...upload, tempFiles: upload.ok ? upload.photos.map((p) => p.tempPath) : [], present };
}

describe('an oil change posted with its photos', () => {
  test('fields and checked photos are read', async () => {
    const form = new FormData();
    form.append('changedOn', '2026-12-01');
    form.append('photoIds', 'a');
    form.append('photoIds', 'b');
    form.append('photos', new Blob([png()], { type: 'image/png' }), 'plug.png');
    const r = await readOilChangeUpload(new Request('http://local/', { method: 'POST', body: form }));
    if (!r.ok) throw new Error(r.message);
    expect(r.input).toMatchObject({ changedOn: '2026-12-01', photoIds: ['a', 'b'] });
    expect(r.photos).toHaveLength(1);
    expect(r.photos[0]!.contentType).toBe('image/png');
    expect(r.photos[0]!.byteSize).toBe(png().byteLength);
    // The photo streamed into a temp file, there while the oil change is saved and gone afterwards.
    expect(r.present).toEqual([true]);
    expect(r.tempFiles.map((f) => existsSync(f))).toEqual([false]);
  });

  test('a file input left empty sends a nameless empty part, which is not a photo', async () => {
    const form = new FormData();
    form.append('changedOn', '2026-12-01');
    form.append('photos', new Blob([], { type: 'application/octet-stream' }), '');
    const r = await readOilChangeUpload(new Request('http://local/', { method: 'POST', body: form }));
    if (!r.ok) throw new Error(r.message);
    expect(r.photos).toEqual([]);
  });

  test('a photo over 10 MB is refused by name, and the photos before it leave no temp file', async () => {
    const form = new FormData();
    form.append('photos', new Blob([png()], { type: 'image/png' }), 'small.png');
    const big = new Uint8Array(10 * 1024 * 1024 + 1);
    big.set(png());
    form.append('photos', new Blob([big], { type: 'image/png' }), 'huge.png');
    let seen: string[] = [];
    const r = await withOilChangeUpload(new Request('http://local/', { method: 'POST', body: form }), async (u) => {
      if (u.ok) seen = u.photos.map((p) => p.tempPath);
      return u;
    });
    expect(r).toMatchObject({ ok: false, status: 413 });
    expect(r.ok ? '' : r.message).toContain('huge.png');
    expect(seen).toEqual([]);
  });

  test.each([
    ['a 100 KB field', (f: FormData) => f.append('notes', 'x'.repeat(100_000))],
    ['a hundred fields', (f: FormData) => Array.from({ length: 100 }, (_, i) => f.append(`f${i}`, 'x'))],
  ])('%s is refused whole with a sentence', async (_name, fill) => {
    const form = new FormData();
    form.append('changedOn', '2026-12-01');
    fill(form);
    const r = await readOilChangeUpload(new Request('http://local/', { method: 'POST', body: form }));
    expect(r).toMatchObject({ ok: false, status: 413 });
    expect(r.ok ? '' : r.message).toMatch(/nothing was saved/);
  });

  test('the same form posted urlencoded is read, without photos', async () => {
    const r = await readOilChangeUpload(
      new Request('http://local/', {
        method: 'POST',
        body: new URLSearchParams([
          ['changedOn', '2026-12-01'],
          ['photoIds', 'a'],
        ]),
      }),
    );
    if (!r.ok) throw new Error(r.message);
    expect(r.input).toMatchObject({ changedOn: '2026-12-01', photoIds: ['a'] });
    expect(r.photos).toEqual([]);
  });

  test('a body that is not multipart is refused with a sentence', async () => {
    const r = await readOilChangeUpload(
      new Request('http://local/', {
        method: 'POST',
        body: 'changedOn=2026-12-01',
        headers: { 'content-type': 'multipart/form-data; boundary=x' },
      }),
    );
    expect(r).toMatchObject({ ok: false, status: 415 });
  });

  test('a renamed text file is refused as not an image', async () => {
    const form = new FormData();
    form.append('photos', new Blob(['not a picture'], { type: 'image/png' }), 'fake.png');
    const r = await readOilChangeUpload(new Request('http://local/', { method: 'POST', body: form }));
    expect(r).toMatchObject({ ok: false, status: 415 });
  });

  test('a chunked body past the cap is cut off, not buffered whole', async () => {
    let sent = 0;
    const chunk = new Uint8Array(1024 * 1024);
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        sent += chunk.length;
        if (sent > OIL_CHANGE_UPLOAD_MAX_BYTES + 64 * chunk.length) controller.close();
        else controller.enqueue(chunk);
      },
    });
    const r = await readOilChangeUpload(
      new Request('http://local/', {
        method: 'POST',
        body,
        headers: { 'content-type': 'multipart/form-data; boundary=x' },
        duplex: 'half',
      } as RequestInit),
    );
    expect(r).toMatchObject({ ok: false, status: 413 });
    // The reader drains at most 16 MiB past the cap (so the client can read the 413), then stops; the streams
    // between the body and the parser hold a few chunks more. The body would have gone on for 64 MiB more.
    expect(sent).toBeLessThan(OIL_CHANGE_UPLOAD_MAX_BYTES + (16 + 4) * chunk.length);
  });

  test('more than five photos are refused', async () => {
    const form = new FormData();
    for (let i = 0; i < 6; i++) form.append('photos', new Blob([png()], { type: 'image/png' }), `p${i}.png`);
    const r = await readOilChangeUpload(new Request('http://local/', { method: 'POST', body: form }));
    expect(r).toMatchObject({ ok: false, status: 400, message: 'Send at most 5 photos at once.' });
  });
});
