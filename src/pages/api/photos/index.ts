import type { APIRoute } from 'astro';
import { requireApiCrew } from '~/lib/auth/guards';
import { getConfig } from '~/lib/config';
import { getDb } from '~/lib/db';
import { jsonError, jsonOk } from '~/lib/http/json';
import { readMultipartForm } from '~/lib/http/form';
import { actorFrom, refusalJson } from '~/lib/http/page-context';
import { PHOTO_MAX_BYTES } from '~/lib/photos/photos';
import { uploadPhoto } from '~/lib/photos/photos.service';
import { PhotoStorageError } from '~/lib/photos/photos.storage';

/** Room for the multipart envelope around one photo. */
const ENVELOPE_BYTES = 64 * 1024;
const tooLarge = (bytes: number) => jsonError(413, 'too_large', `The upload is ${(bytes / 1048576).toFixed(1)} MB; photos can be at most 10 MB each.`, { file: 'Photos can be at most 10 MB each.' });

/** POST multipart/form-data with one `file`: checks and stores a photo, answers its id. */
export const POST: APIRoute = async ({ request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  if (!/^multipart\/form-data\b/i.test(request.headers.get('content-type') ?? '')) {
    return jsonError(415, 'unsupported_media_type', 'Send the photo as multipart/form-data in a field named "file".');
  }
  // Read with a cap, so an upload without a length header is cut off instead of buffered whole.
  const body = await readMultipartForm(request, PHOTO_MAX_BYTES + ENVELOPE_BYTES);
  if (!body.ok) return body.reason === 'too-large' ? tooLarge(body.size) : jsonError(400, 'invalid_form', 'The upload could not be read as a form.');
  const form = body.form;
  const file = form.get('file');
  if (!file || typeof file === 'string') return jsonError(400, 'invalid_input', 'Attach the photo in a field named "file".', { file: 'Choose a photo.' });
  let r: Awaited<ReturnType<typeof uploadPhoto>>;
  try {
    r = await uploadPhoto(getDb(), actorFrom(g), new Uint8Array(await file.arrayBuffer()), file.name || 'The file', getConfig().UPLOAD_DIR);
  } catch (e) {
    // The file is written before its row, so a failed write leaves neither; the person gets a sentence, the log the errno.
    if (!(e instanceof PhotoStorageError)) throw e;
    console.error(`[photos] upload not stored: ${e.message}`);
    return e.reason === 'full'
      ? jsonError(507, 'storage_full', 'The photo was not saved: the server has no room left for photos. Try again later; the crew lead can ask whoever runs the server to free space.', { file: 'Not saved: no room left for photos.' })
      : jsonError(503, 'storage_unavailable', 'The photo was not saved: the server cannot store photos right now. Try again later.', { file: 'Not saved: photos cannot be stored right now.' }, { 'retry-after': '60' });
  }
  if (!r.ok) return refusalJson(r);
  const p = r.value;
  return jsonOk({ photo: { id: p.id, url: `/api/photos/${p.id}`, contentType: p.content_type, byteSize: p.byte_size, width: p.width, height: p.height, sha256: p.sha256 } }, 201);
};
