import { readBodyText } from '~/lib/http/json';
import { readMultipart } from '~/lib/http/multipart-file';
import { readFormObject } from '~/lib/http/result';
import { stagePhoto, type StagedPhoto, type StageResult } from '../photos/photo-intake';
import { PHOTO_MAX_BYTES } from '../photos/photos';

/** One multipart oil change carries at most this many photos (the uploader sends them one by one instead). */
export const FORM_PHOTOS = 5;
/** Room for the fields and the multipart envelope around the photos. */
const FORM_FIELDS_BYTES = 1_000_000;
export const OIL_CHANGE_UPLOAD_MAX_BYTES = FORM_PHOTOS * PHOTO_MAX_BYTES + FORM_FIELDS_BYTES;
/**
 * Past the cap the rest is read and dropped up to 16 MiB more, so the client reads the 413 rather than a reset
 * (common practice, no published source); past that the read stops.
 */
const DRAIN_LIMIT_BYTES = OIL_CHANGE_UPLOAD_MAX_BYTES + 16 * 1024 * 1024;
/** The longest text field the form has is 2,000 characters of notes; 64 KB leaves room for any script. */
const FIELD_MAX_BYTES = 64 * 1024;
/** Twenty attached photo ids and a dozen fields, with room to spare. */
const FORM_FIELDS = 64;

export type OilChangeUpload =
  | { ok: true; input: Record<string, unknown>; values: FormData; photos: StagedPhoto[] }
  | { ok: false; status: 400 | 413 | 415; message: string; values: FormData | null };

const tooLarge = (bytes: number): OilChangeUpload => ({
  ok: false,
  status: 413,
  values: null,
  message: `That is ${(bytes / 1048576).toFixed(0)} MB of photos; send at most ${FORM_PHOTOS} photos of up to 10 MB each.`,
});

/**
 * Reads an oil change posted as multipart/form-data with its photos in `photos` (the plain form, and a write
 * queued offline) and hands it to `use`. The body is read as it arrives: fields are kept, each photo streams into
 * a checked temp file (never whole in memory), and those temp files are removed once `use` is done, whatever
 * happens. Nothing is stored here.
 */
export async function withOilChangeUpload<T>(
  request: Request,
  use: (upload: OilChangeUpload) => Promise<T>,
): Promise<T> {
  if (/^application\/x-www-form-urlencoded\b/i.test(request.headers.get('content-type') ?? ''))
    return use(await readPlainForm(request));
  const values = new FormData();
  const staging: Promise<StageResult>[] = [];
  let truncated = false;
  let tooMany = false;
  const outcome = await readMultipart(
    request,
    {
      maxBytes: OIL_CHANGE_UPLOAD_MAX_BYTES,
      drainLimit: DRAIN_LIMIT_BYTES,
      files: FORM_PHOTOS,
      fields: FORM_FIELDS,
      fieldSize: FIELD_MAX_BYTES,
    },
    {
      onField(name, value, cut) {
        truncated ||= cut;
        values.append(name, value);
      },
      onFile(name, file, fileName) {
        // A file input left empty still sends a part with no name and no bytes.
        if (name !== 'photos' || fileName === '') {
          file.resume();
          return;
        }
        staging.push(stagePhoto(file, fileName));
      },
      onLimit(what) {
        if (what === 'files') tooMany = true;
        else truncated = true;
      },
    },
  );
  const settled = await Promise.allSettled(staging);
  const photos = settled.flatMap((s) => (s.status === 'fulfilled' && s.value.ok ? [s.value.photo] : []));
  try {
    // A temp file that could not be written is the server's trouble (PhotoStorageError), not the rider's; a
    // body cut off midway ends its photos' reads with an error too, and is answered by judge().
    const failed = settled.find((s) => s.status === 'rejected');
    if (failed && outcome.ok) throw failed.reason;
    return await use(judge());
  } finally {
    await Promise.all(photos.map((p) => p.discard()));
  }

  function judge(): OilChangeUpload {
    if (!outcome.ok)
      return outcome.reason === 'too-large'
        ? tooLarge(outcome.size)
        : {
            ok: false,
            status: 415,
            values: null,
            message: 'The form could not be read; send it as multipart/form-data.',
          };
    if (outcome.bodyBytes > OIL_CHANGE_UPLOAD_MAX_BYTES) return tooLarge(outcome.bodyBytes);
    if (truncated)
      return {
        ok: false,
        status: 413,
        values: null,
        message: `The form has more fields, or a longer one, than an oil change needs (at most ${FORM_FIELDS} fields of 64 KB); nothing was saved.`,
      };
    if (tooMany) return { ok: false, status: 400, values, message: `Send at most ${FORM_PHOTOS} photos at once.` };
    for (const s of settled) {
      if (s.status === 'rejected' || s.value.ok || s.value.code === 'empty') continue;
      return { ok: false, status: s.value.code === 'too_large' ? 413 : 415, values, message: s.value.message };
    }
    return { ok: true, input: readFormObject(values, ['photoIds']), values, photos };
  }
}

/** The same form posted urlencoded (no photos): its fields, read with a cap. */
async function readPlainForm(request: Request): Promise<OilChangeUpload> {
  const body = await readBodyText(request, FIELD_MAX_BYTES * 4);
  if (!body.ok)
    return {
      ok: false,
      status: 413,
      values: null,
      message: 'The form is longer than an oil change needs; nothing was saved.',
    };
  const values = new FormData();
  for (const [name, value] of new URLSearchParams(body.text)) values.append(name, value);
  return { ok: true, input: readFormObject(values, ['photoIds']), values, photos: [] };
}
