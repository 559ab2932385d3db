/**
 * Memory of an oil change posted with five 10 MB photos (the form's largest allowed body, 51 MB), read as the
 * app reads it: the body streams in 64 KB chunks and each photo goes into a checked temp file. Beside it, in the
 * same run, the same body read whole the way a plain `request.formData()` does (the body, then the form's
 * copies of each file). Target: once the app has read one form, a later one grows the process by less than one photo
 * (10 MB), the median of several. Prints JSON; no assertions. Run: node --import tsx tests/bench/photo-form.bench.ts
 */
import { PNG } from 'pngjs';
import { performance } from 'node:perf_hooks';
import { FORM_PHOTOS, withOilChangeUpload } from '~/lib/oil-changes/oil-change-upload';
import { PHOTO_MAX_BYTES } from '~/lib/photos/photos';

const BOUNDARY = '----sumpwisePhotoFormBench';
const CHUNK = 64 * 1024;
const TARGET_MB = 10;
const mb = (bytes: number) => Math.round((bytes / 1048576) * 10) / 10;

/** A real PNG header and image, padded with zero bytes to just under the photo cap (readers ignore the tail). */
function photoBytes(): Uint8Array {
  const png = new PNG({ width: 64, height: 48 });
  png.data.fill(180);
  const head = PNG.sync.write(png);
  const bytes = new Uint8Array(PHOTO_MAX_BYTES - 1024);
  bytes.set(head);
  return bytes;
}

/** The multipart body as a list of parts; photos are the same bytes, referenced, not copied. */
function bodyParts(photo: Uint8Array): Uint8Array[] {
  const enc = new TextEncoder();
  const parts: Uint8Array[] = [];
  for (const [name, value] of [
    ['changedOn', '2026-11-30'],
    ['odometer', '12400'],
    ['saeGrade', '10W-40'],
  ])
    parts.push(enc.encode(`--${BOUNDARY}\r\nContent-Disposition: form-data; name="${name}"\r\n\r\n${value}\r\n`));
  for (let i = 0; i < FORM_PHOTOS; i++) {
    parts.push(
      enc.encode(
        `--${BOUNDARY}\r\nContent-Disposition: form-data; name="photos"; filename="plug-${i}.png"\r\nContent-Type: image/png\r\n\r\n`,
      ),
      photo,
      enc.encode('\r\n'),
    );
  }
  parts.push(enc.encode(`--${BOUNDARY}--\r\n`));
  return parts;
}

/** A request whose body arrives in 64 KB chunks, as from a socket, never as one buffer. */
function streamedRequest(parts: Uint8Array[]): Request {
  let part = 0;
  let offset = 0;
  const body = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (part >= parts.length) return controller.close();
      const p = parts[part]!;
      const end = Math.min(offset + CHUNK, p.byteLength);
      // A copy, like a socket's fresh buffer: the source bytes are not handed on.
      controller.enqueue(p.slice(offset, end));
      offset = end;
      if (offset >= p.byteLength) {
        part++;
        offset = 0;
      }
    },
  });
  return new Request('http://bench.local/machines/x/oil-change', {
    method: 'POST',
    headers: { 'content-type': `multipart/form-data; boundary=${BOUNDARY}` },
    body,
    duplex: 'half',
  } as RequestInit);
}

/** Runs `work` and returns the peak RSS above the RSS when it started, sampled every 2 ms. */
async function peakGrowth(work: () => Promise<unknown>): Promise<{ growthMb: number; ms: number }> {
  global.gc?.();
  const start = process.memoryUsage().rss;
  let peak = start;
  const sampler = setInterval(() => {
    peak = Math.max(peak, process.memoryUsage().rss);
  }, 2);
  const t = performance.now();
  await work();
  const ms = Math.round(performance.now() - t);
  clearInterval(sampler);
  peak = Math.max(peak, process.memoryUsage().rss);
  return { growthMb: mb(peak - start), ms };
}

const photo = photoBytes();
const parts = bodyParts(photo);
const bodyMb = mb(parts.reduce((n, p) => n + p.byteLength, 0));

let photosStaged = 0;
const readStreamed = () =>
  withOilChangeUpload(streamedRequest(parts), async (upload) => {
    if (!upload.ok) throw new Error(`the bench form was refused: ${upload.message}`);
    photosStaged = upload.photos.length;
  });
// The first read also loads the reader's code and grows the heap its buffers then reuse; the later ones are what
// every later form costs a running app. One later read moves by several MB with where the collector happens to
// run (0.4 to 12.3 MB in runs the same hour), so the figure is the median of LATER_FORMS, with every one printed.
const LATER_FORMS = 7;
const firstStreamed = await peakGrowth(readStreamed);
const later: { growthMb: number; ms: number }[] = [];
for (let i = 0; i < LATER_FORMS; i++) later.push(await peakGrowth(readStreamed));
const middle = <T>(values: T[], by: (v: T) => number): T =>
  [...values].sort((a, b) => by(a) - by(b))[Math.floor(values.length / 2)]!;
const streamed = {
  growthMb: middle(later, (r) => r.growthMb).growthMb,
  ms: middle(later, (r) => r.ms).ms,
  maxGrowthMb: Math.max(...later.map((r) => r.growthMb)),
  everyGrowthMb: later.map((r) => r.growthMb),
};
// The same body read whole: the bytes, then the parsed form and each file's bytes.
const whole = await peakGrowth(async () => {
  const form = await streamedRequest(parts).formData();
  let bytes = 0;
  for (const f of form.getAll('photos')) if (typeof f !== 'string') bytes += (await f.arrayBuffer()).byteLength;
  return bytes;
});

const ok = streamed.growthMb < TARGET_MB && photosStaged === FORM_PHOTOS;
console.log(
  JSON.stringify({
    bench: 'photo-form',
    bodyMb,
    photos: photosStaged,
    firstStreamed,
    streamed,
    readWhole: whole,
    summary: [
      {
        what: `oil-change form with ${FORM_PHOTOS} photos of 10 MB (${bodyMb} MB body), peak RSS growth while read`,
        result: `${streamed.growthMb} MB in ${streamed.ms} ms, median of ${LATER_FORMS} forms (at most ${streamed.maxGrowthMb} MB), each photo streamed into a checked temp file (the process's first form: ${firstStreamed.growthMb} MB)`,
        floor: `read whole (request.formData()): ${whole.growthMb} MB`,
        ratio: Math.round((streamed.growthMb / whole.growthMb) * 100) / 100,
        limit: `< ${TARGET_MB} MB`,
        ok,
      },
    ],
    node: process.version,
  }),
);
