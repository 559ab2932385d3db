import type { APIRoute } from 'astro';
import { Readable } from 'node:stream';
import { requireApiUser } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { refusalJson } from '~/lib/http/responses';
import { getPhotoForMember } from '~/lib/photos/photos.service';
import { photoKey, PhotoStorageError } from '~/lib/photos/photo-store';
import { getPhotoStore } from '~/lib/photos/photo-stores';
import { jsonError } from '~/lib/http/json';

/** GET a photo: members of its crew only; content-addressed, so cached privately for a year. Streamed from the store. */
export const GET: APIRoute = async ({ params, request, locals }) => {
  const user = requireApiUser(locals);
  if (user instanceof Response) return user;
  const r = await getPhotoForMember(getDb(), locals.crews, params.id ?? '');
  if (!r.ok) return refusalJson(r);
  const p = r.value;
  const etag = `"${p.sha256}"`;
  const headers: Record<string, string> = {
    'cache-control': 'private, max-age=31536000, immutable',
    etag,
    'content-type': p.content_type,
    'x-content-type-options': 'nosniff',
    'content-disposition': 'inline',
  };
  const match = request.headers.get('if-none-match');
  if (
    match &&
    match
      .split(',')
      .map((t) => t.trim().replace(/^W\//, ''))
      .includes(etag)
  )
    return new Response(null, { status: 304, headers });
  let stored: Awaited<ReturnType<ReturnType<typeof getPhotoStore>['get']>>;
  try {
    stored = await getPhotoStore().get(photoKey(p.sha256));
  } catch (e) {
    if (!(e instanceof PhotoStorageError)) throw e;
    console.error(`[photos] photo not read: ${e.message}`);
    return jsonError(
      503,
      'storage_unavailable',
      'The photo cannot be read right now. Try again later.',
      {},
      { 'retry-after': '60' },
    );
  }
  if (!stored)
    return refusalJson({
      ok: false,
      status: 404,
      code: 'not_found',
      message: 'The photo file is missing.',
      fields: {},
    });
  const body = Readable.toWeb(stored.body) as ReadableStream<Uint8Array>;
  return new Response(body, { status: 200, headers: { ...headers, 'content-length': String(stored.byteSize) } });
};
