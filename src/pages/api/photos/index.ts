import type { APIRoute } from 'astro';
import { requireApiCrew } from '~/lib/auth/guards';
import { getDb } from '~/lib/db';
import { jsonError, jsonOk } from '~/lib/http/json';
import { withMultipartFile } from '~/lib/http/multipart-file';
import { actorFrom } from '~/lib/http/page-context';
import { refusalJson } from '~/lib/http/responses';
import { PHOTO_MAX_BYTES } from '~/lib/photos/photos';
import { uploadPhoto } from '~/lib/photos/photos.service';
import { PhotoStorageError } from '~/lib/photos/photo-store';
import { getPhotoStore } from '~/lib/photos/photo-stores';

/** Room for the multipart envelope around one photo. */
const ENVELOPE_BYTES = 64 * 1024;
const MAX_BODY_BYTES = PHOTO_MAX_BYTES + ENVELOPE_BYTES;
/** Past this, the read stops at once; up to it the rest of a too-large upload is read and dropped, so the client sees the 413. */
const DRAIN_LIMIT_BYTES = MAX_BODY_BYTES + 16 * 1024 * 1024;
const tooLarge = (bytes: number) =>
  jsonError(413, 'too_large', `The upload is ${(bytes / 1048576).toFixed(1)} MB; photos can be at most 10 MB each.`, {
    file: 'Photos can be at most 10 MB each.',
  });

/** POST multipart/form-data with one `file`: checks and stores a photo as it streams in, answers its id. */
export const POST: APIRoute = async ({ request, locals }) => {
  const g = requireApiCrew(locals);
  if (g instanceof Response) return g;
  if (!/^multipart\/form-data\b/i.test(request.headers.get('content-type') ?? '')) {
    return jsonError(415, 'unsupported_media_type', 'Send the photo as multipart/form-data in a field named "file".');
  }
  let upload: Awaited<ReturnType<typeof withMultipartFile<Awaited<ReturnType<typeof uploadPhoto>>>>>;
  try {
    upload = await withMultipartFile(
      request,
      { field: 'file', maxBytes: MAX_BODY_BYTES, drainLimit: DRAIN_LIMIT_BYTES },
      (file, name) => uploadPhoto(getDb(), actorFrom(g), file, name || 'The file', getPhotoStore()),
    );
  } catch (e) {
    // The bytes are stored before their row, so a failed write leaves neither; the person gets a sentence, the log the cause.
    if (!(e instanceof PhotoStorageError)) throw e;
    console.error(`[photos] upload not stored: ${e.message}`);
    return e.reason === 'full'
      ? jsonError(
          507,
          'storage_full',
          'The photo was not saved: the server has no room left for photos. Try again later; the crew lead can ask whoever runs the server to free space.',
          { file: 'Not saved: no room left for photos.' },
        )
      : jsonError(
          503,
          'storage_unavailable',
          'The photo was not saved: the server cannot store photos right now. Try again later.',
          { file: 'Not saved: photos cannot be stored right now.' },
          { 'retry-after': '60' },
        );
  }
  if (!upload.ok) {
    if (upload.reason === 'too-large') return tooLarge(upload.size);
    if (upload.reason === 'no-file')
      return jsonError(400, 'invalid_input', 'Attach the photo in a field named "file".', { file: 'Choose a photo.' });
    return jsonError(400, 'invalid_form', 'The upload could not be read as a form.');
  }
  const r = upload.value;
  // A file past the cap is refused by the check; the message names the whole upload's size, as the client sent it.
  if (!r.ok) return r.code === 'too_large' ? tooLarge(upload.bodyBytes) : refusalJson(r);
  const p = r.value;
  return jsonOk(
    {
      photo: {
        id: p.id,
        url: `/api/photos/${p.id}`,
        contentType: p.content_type,
        byteSize: p.byte_size,
        width: p.width,
        height: p.height,
        sha256: p.sha256,
      },
    },
    201,
  );
};
