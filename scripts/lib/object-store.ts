// A local fake of the S3 object store (s3rver), on loopback only, with the photo bucket created: what
// `npm start` and the tests run so the S3 code path is the one exercised. Never run it in production.
import S3rver from 's3rver';
import { mkdirSync } from 'node:fs';

export interface LocalObjectStore {
  endpoint: string;
  close(): Promise<void>;
}

/** Starts the fake on 127.0.0.1:`port` keeping objects under `directory`, with `bucket` created. */
export async function startLocalObjectStore(options: {
  port: number;
  directory: string;
  bucket: string;
}): Promise<LocalObjectStore> {
  mkdirSync(options.directory, { recursive: true });
  const server = new S3rver({
    address: '127.0.0.1',
    port: options.port,
    silent: true,
    directory: options.directory,
    configureBuckets: [{ name: options.bucket }],
  });
  const { port } = await server.run();
  return { endpoint: `http://127.0.0.1:${port}`, close: () => server.close() };
}
