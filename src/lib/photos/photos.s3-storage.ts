import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import { Readable } from 'node:stream';
import { toStorageError, type PhotoStore, type StoredPhoto } from './photo-store';

// The object store: any S3 API (a cloud bucket, a self-hosted store, or the local fake `npm start` runs), so
// every app machine reads and writes the same photos. Bytes stream in and out: an upload is sent from its
// checked temp file with a known length, a download is piped from the store's response to ours.

export interface S3PhotoStoreSettings {
  endpoint: string;
  region: string;
  bucket: string;
  accessKeyId: string;
  secretAccessKey: string;
  forcePathStyle: boolean;
}

/** Keys live under this prefix, so the bucket can hold other things later without a clash. */
const PREFIX = 'photos/';

function isMissing(error: unknown): boolean {
  return (
    error instanceof S3ServiceException &&
    (error.$metadata.httpStatusCode === 404 || error.name === 'NoSuchKey' || error.name === 'NotFound')
  );
}

/** A photo store on an S3-API bucket. */
export function createS3PhotoStore(settings: S3PhotoStoreSettings): PhotoStore {
  const client = new S3Client({
    endpoint: settings.endpoint,
    region: settings.region,
    forcePathStyle: settings.forcePathStyle,
    credentials: { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey },
    // Checksums only where the API demands them: the SDK's default CRC trailer (aws-chunked bodies) is not
    // understood by every S3-compatible store, the local fake included; the body's length is still signed.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
    // A store that does not answer fails the upload within seconds rather than holding the request.
    requestHandler: { connectionTimeout: 5_000, requestTimeout: 60_000 },
    maxAttempts: 2,
  });
  const Bucket = settings.bucket;
  const head = async (key: string): Promise<number | null> => {
    try {
      const r = await client.send(new HeadObjectCommand({ Bucket, Key: PREFIX + key }));
      return r.ContentLength ?? 0;
    } catch (error) {
      if (isMissing(error)) return null;
      throw toStorageError(error);
    }
  };
  return {
    kind: 's3',
    async put(key, body, byteSize, contentType) {
      try {
        // Content-addressed: the same bytes are already there, so the second upload of a picture costs nothing.
        if ((await head(key)) === byteSize) {
          body.destroy();
          return;
        }
        // One PUT with a known length streams the body without buffering it; photos are at most 10 MB, well
        // under the 5 GB a single PUT takes (S3 API limits, from memory), so no multipart upload is needed.
        await client.send(
          new PutObjectCommand({
            Bucket,
            Key: PREFIX + key,
            Body: body,
            ContentLength: byteSize,
            ContentType: contentType,
          }),
        );
      } catch (error) {
        body.destroy();
        throw toStorageError(error);
      }
    },
    async get(key): Promise<StoredPhoto | null> {
      try {
        const r = await client.send(new GetObjectCommand({ Bucket, Key: PREFIX + key }));
        if (!(r.Body instanceof Readable)) throw new Error('the S3 client answered without a Node stream');
        return { body: r.Body, byteSize: r.ContentLength ?? 0 };
      } catch (error) {
        if (isMissing(error)) return null;
        throw toStorageError(error);
      }
    },
    async exists(key) {
      return (await head(key)) !== null;
    },
    async delete(key) {
      try {
        await client.send(new DeleteObjectCommand({ Bucket, Key: PREFIX + key }));
      } catch (error) {
        if (!isMissing(error)) throw toStorageError(error);
      }
    },
  };
}
