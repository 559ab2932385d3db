import { readBodyBytes } from '../http/json';
import { readFormObject } from '~/lib/http/result';
import { PHOTO_MAX_BYTES, preparePhoto, type PreparedPhoto } from '../photos/photos';

/** One multipart oil change carries at most this many photos (the uploader sends them one by one instead). */
export const FORM_PHOTOS = 5;
/** Room for the fields and the multipart envelope around the photos. */
const FORM_FIELDS_BYTES = 1_000_000;
export const OIL_CHANGE_UPLOAD_MAX_BYTES = FORM_PHOTOS * PHOTO_MAX_BYTES + FORM_FIELDS_BYTES;

export type OilChangeUpload =
  | { ok: true; input: Record<string, unknown>; values: FormData; photos: PreparedPhoto[] }
  | { ok: false; status: 400 | 413 | 415; message: string; values: FormData | null };

/**
 * Reads an oil change posted as multipart/form-data with its photos in `photos` (the plain form, and a
 * write queued offline): the body is read with a cap, each photo is checked, nothing is stored here.
 */
export async function readOilChangeUpload(request: Request): Promise<OilChangeUpload> {
  const body = await readBodyBytes(request, OIL_CHANGE_UPLOAD_MAX_BYTES);
  if (!body.ok) {
    return {
      ok: false,
      status: 413,
      values: null,
      message: `That is ${(body.size / 1048576).toFixed(0)} MB of photos; send at most ${FORM_PHOTOS} photos of up to 10 MB each.`,
    };
  }
  let form: FormData;
  try {
    form = await new Request('http://local/', {
      method: 'POST',
      headers: { 'content-type': request.headers.get('content-type') ?? '' },
      body: Buffer.from(body.bytes),
    }).formData();
  } catch {
    return {
      ok: false,
      status: 415,
      values: null,
      message: 'The form could not be read; send it as multipart/form-data.',
    };
  }
  const files = form.getAll('photos').filter((f): f is File => typeof f !== 'string' && f.size > 0);
  if (files.length > FORM_PHOTOS)
    return { ok: false, status: 400, values: form, message: `Send at most ${FORM_PHOTOS} photos at once.` };
  const photos: PreparedPhoto[] = [];
  for (const f of files) {
    const p = preparePhoto(new Uint8Array(await f.arrayBuffer()), f.name || 'A photo');
    if (!p.ok)
      return {
        ok: false,
        status: p.code === 'too_large' ? 413 : p.code === 'not_an_image' ? 415 : 400,
        values: form,
        message: p.message,
      };
    photos.push(p.photo);
  }
  return { ok: true, input: readFormObject(form, ['photoIds']), values: form, photos };
}
