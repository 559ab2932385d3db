import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonError, jsonOk, parseJsonBody } from '~/lib/http/json';
import { refuseQueuedWriteOfOtherCrew } from '~/lib/http/queued-write';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';
import { withOilChangeUpload } from '~/lib/oil-changes/oil-change-upload';
import { createOilChange, listOilChanges } from '~/lib/oil-changes/oil-changes.service';
import { PhotoStorageError } from '~/lib/photos/photos.storage';
import { getPhotoStore } from '~/lib/photos/photo-stores';

/** GET the machine's oil changes, newest first, with the distance since the previous one. */
export const GET: APIRoute = async ({ params, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const r = await listOilChanges(getDb(), actorFrom(g), params.id ?? '');
  return r.ok
    ? jsonOk({
        oilChanges: r.value.map((c) => ({
          ...c,
          photos: c.photos.map((p) => ({ id: p.id, url: `/api/photos/${p.id}` })),
        })),
      })
    : refusalJson(r);
};

/**
 * POST an oil change: JSON (photoIds from POST /api/photos), or multipart/form-data with the photos in
 * `photos` (a write queued offline: the oil change and its photos in one transaction). A resend with the
 * same clientKey answers the first oil change with 200.
 */
export const POST: APIRoute = async ({ params, request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  const otherCrew = refuseQueuedWriteOfOtherCrew(request, g.crew, locals.crews);
  if (otherCrew) return otherCrew;
  const save = (input: unknown, photos: Parameters<typeof createOilChange>[4] = {}) =>
    createOilChange(getDb(), actorFrom(g), params.id ?? '', input, photos).then((r) => {
      if (!r.ok) return refusalJson(r);
      const { repeated, ...oilChange } = r.value;
      return jsonOk({ oilChange, repeated }, repeated ? 200 : 201);
    });
  try {
    if (/^multipart\/form-data\b/i.test(request.headers.get('content-type') ?? '')) {
      return await withOilChangeUpload(request, (upload) =>
        upload.ok
          ? save(upload.input, { newPhotos: upload.photos, photoStore: getPhotoStore() })
          : Promise.resolve(
              jsonError(upload.status, upload.status === 413 ? 'too_large' : 'invalid_input', upload.message, {
                photos: upload.message,
              }),
            ),
      );
    }
    const body = await parseJsonBody(request, z.looseObject({}));
    if (!body.ok) return body.response;
    return await save(body.data);
  } catch (e) {
    if (!(e instanceof PhotoStorageError)) throw e;
    console.error(`[oil-change] photos not stored: ${e.message}`);
    return jsonError(
      503,
      'storage_unavailable',
      'Nothing was saved: photos cannot be stored right now. It will be tried again.',
      {},
      { 'retry-after': '60' },
    );
  }
};
