import busboy from 'busboy';
import { Readable, Transform } from 'node:stream';

// multipart/form-data bodies read as they arrive: fields and files are handed on while the body streams in, so
// an upload is never held whole in memory. The body is counted as it is read whatever its transfer encoding (a chunked
// body has no length to trust): past the drain limit the read stops at once.

/** How much of a multipart body is read: parts past the busboy limits are dropped and reported. */
export interface MultipartLimits {
  /** Past this the body is too large (the caller's refusal); it is still read and dropped up to drainLimit. */
  maxBytes: number;
  /** Past this the read stops at once and the connection ends. */
  drainLimit: number;
  files: number;
  fields: number;
  fieldSize: number;
}

export interface MultipartHandlers {
  /** A text field; `truncated` when it was longer than the fieldSize limit (only its start is given). */
  onField?(name: string, value: string, truncated: boolean): void;
  /** A file part: read it to its end (or `resume()` it to drop it), or the body never finishes. */
  onFile(name: string, file: Readable, fileName: string): void;
  /** More fields or files came than the limits allow; the extra ones were dropped. */
  onLimit?(what: 'files' | 'fields' | 'parts'): void;
}

export type MultipartOutcome =
  { ok: true; bodyBytes: number } | { ok: false; reason: 'too-large'; size: number } | { ok: false; reason: 'invalid' };

/**
 * Reads a multipart/form-data body as it arrives, handing each field and file part on; nothing is buffered
 * whole. A body past `drainLimit` bytes, or a malformed one, ends the read: the files being read see their
 * stream end with an error, and the outcome is "too-large" whenever more than `maxBytes` came.
 */
export async function readMultipart(
  request: Request,
  limits: MultipartLimits,
  handlers: MultipartHandlers,
): Promise<MultipartOutcome> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type) || !request.body) return { ok: false, reason: 'invalid' };
  const declared = Number(request.headers.get('content-length') ?? 'NaN');
  if (Number.isFinite(declared) && declared > limits.drainLimit)
    return { ok: false, reason: 'too-large', size: declared };

  let parser: busboy.Busboy;
  try {
    parser = busboy({
      headers: { 'content-type': type },
      limits: {
        files: limits.files,
        fields: limits.fields,
        fieldSize: limits.fieldSize,
        parts: limits.files + limits.fields,
      },
    });
  } catch {
    return { ok: false, reason: 'invalid' };
  }
  let bodyBytes = 0;
  let overLimit = false;
  const open = new Set<Readable>();
  const counter = new Transform({
    transform(chunk: Buffer, _enc, done) {
      bodyBytes += chunk.byteLength;
      if (bodyBytes > limits.drainLimit) {
        overLimit = true;
        done(new Error('body over the drain limit'));
        return;
      }
      done(null, chunk);
    },
  });
  const source = Readable.fromWeb(request.body as import('node:stream/web').ReadableStream<Uint8Array>);
  const parsed = new Promise<void>((resolve, reject) => {
    parser.on('file', (name, file, info) => {
      open.add(file);
      file.once('close', () => open.delete(file));
      handlers.onFile(name, file, info.filename ?? '');
    });
    parser.on('field', (name, value, info) => handlers.onField?.(name, value, info.valueTruncated));
    parser.on('filesLimit', () => handlers.onLimit?.('files'));
    parser.on('fieldsLimit', () => handlers.onLimit?.('fields'));
    parser.on('partsLimit', () => handlers.onLimit?.('parts'));
    parser.on('close', () => resolve());
    parser.on('error', reject);
    counter.on('error', reject);
    source.on('error', reject);
  });
  source.pipe(counter).pipe(parser);
  try {
    await parsed;
  } catch {
    source.destroy();
    // The files' readers see their streams end with an error, so they stop and clean up.
    for (const file of open) file.destroy(new Error('upload cut off'));
    return overLimit || bodyBytes > limits.maxBytes
      ? { ok: false, reason: 'too-large', size: bodyBytes }
      : { ok: false, reason: 'invalid' };
  }
  return { ok: true, bodyBytes };
}

export type MultipartFileResult<T> =
  | { ok: true; value: T; bodyBytes: number }
  | { ok: false; reason: 'too-large'; size: number }
  | { ok: false; reason: 'invalid' | 'no-file' };

/**
 * Streams the file in `field` of a multipart body to `handle` (which must read it to its end). Other files
 * are dropped; a body past `drainLimit` bytes, or a malformed one, ends the read with a refusal, which is
 * "too-large" whenever the body was larger than `maxBytes` (what the client most needs to hear).
 */
export async function withMultipartFile<T>(
  request: Request,
  limits: { field: string; maxBytes: number; drainLimit: number },
  handle: (file: Readable, fileName: string) => Promise<T>,
): Promise<MultipartFileResult<T>> {
  const { field, maxBytes, drainLimit } = limits;
  let handled: Promise<T> | undefined;
  // A handful of small fields and files (only the named one is kept; the others are read and dropped, and
  // count against the drain limit), so a file sent before the named one cannot hide it (common practice, no
  // published source).
  const outcome = await readMultipart(
    request,
    { maxBytes, drainLimit, files: 5, fields: 10, fieldSize: 4096 },
    {
      onFile(name, file, fileName) {
        if (name !== field || handled) {
          file.resume();
          return;
        }
        handled = handle(file, fileName);
        // Read by the caller; a rejection is collected below, never left unhandled.
        handled.catch(() => {});
      },
    },
  );
  if (!outcome.ok) {
    await handled?.catch(() => {});
    return outcome;
  }
  if (!handled)
    return outcome.bodyBytes > maxBytes
      ? { ok: false, reason: 'too-large', size: outcome.bodyBytes }
      : { ok: false, reason: 'no-file' };
  return { ok: true, value: await handled, bodyBytes: outcome.bodyBytes };
}
