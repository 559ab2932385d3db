import busboy from 'busboy';
import { Readable, Transform } from 'node:stream';

// One file from a multipart/form-data body, handed on as a stream while the body arrives, so an upload is
// never held whole in memory. The body is counted as it is read whatever its transfer encoding (a chunked
// body has no length to trust): past the drain limit the read stops at once.

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
  const type = request.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type) || !request.body) return { ok: false, reason: 'invalid' };
  const declared = Number(request.headers.get('content-length') ?? 'NaN');
  if (Number.isFinite(declared) && declared > drainLimit) return { ok: false, reason: 'too-large', size: declared };

  let parser: busboy.Busboy;
  try {
    // A handful of small fields and files (only the named one is kept; the others are read and dropped, and
    // count against the drain limit), so a file sent before the named one cannot hide it (common practice, no
    // published source).
    parser = busboy({
      headers: { 'content-type': type },
      limits: { files: 5, fields: 10, fieldSize: 4096, parts: 20 },
    });
  } catch {
    return { ok: false, reason: 'invalid' };
  }
  let bodyBytes = 0;
  let overLimit = false;
  let current: Readable | undefined;
  let handled: Promise<T> | undefined;
  const counter = new Transform({
    transform(chunk: Buffer, _enc, done) {
      bodyBytes += chunk.byteLength;
      if (bodyBytes > drainLimit) {
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
      if (name !== field || handled) {
        file.resume();
        return;
      }
      current = file;
      handled = handle(file, info.filename ?? '');
      // Read by the caller; a rejection is collected below, never left unhandled.
      handled.catch(() => {});
    });
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
    // The file's reader sees the stream end with an error, so it stops and cleans up.
    current?.destroy(new Error('upload cut off'));
    await handled?.catch(() => {});
    return overLimit || bodyBytes > maxBytes
      ? { ok: false, reason: 'too-large', size: bodyBytes }
      : { ok: false, reason: 'invalid' };
  }
  if (!handled)
    return bodyBytes > maxBytes
      ? { ok: false, reason: 'too-large', size: bodyBytes }
      : { ok: false, reason: 'no-file' };
  return { ok: true, value: await handled, bodyBytes };
}
