import type { APIRoute } from 'astro';
import { readFile } from 'node:fs/promises';
import { requireApiUser } from '~/lib/auth/guards';
import { getConfig } from '~/lib/config';
import { getDb } from '~/lib/db';
import { refusalJson } from '~/lib/http/page-context';
import { getPhotoForMember } from '~/lib/photos/photos.service';
import { photoPath } from '~/lib/photos/photos.storage';

/** GET a photo: members of its crew only; content-addressed, so cached privately for a year. */
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
  if (match && match.split(',').map((t) => t.trim().replace(/^W\//, '')).includes(etag)) return new Response(null, { status: 304, headers });
  let bytes: Buffer;
  try {
    bytes = await readFile(photoPath(getConfig().UPLOAD_DIR, p.sha256));
  } catch {
    return refusalJson({ ok: false, status: 404, code: 'not_found', message: 'The photo file is missing.', fields: {} });
  }
  return new Response(new Uint8Array(bytes), { status: 200, headers: { ...headers, 'content-length': String(bytes.byteLength) } });
};
