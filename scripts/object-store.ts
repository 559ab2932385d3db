// A local fake of the object store photos go to: S3 API on 127.0.0.1 at S3_ENDPOINT's port, objects kept under
// .data/object-store (or the folder given as the first argument), bucket S3_BUCKET created. Never in production.
// Usage: node --import tsx scripts/object-store.ts [folder]
import path from 'node:path';
import { readConfig } from '../src/lib/config';
import { startLocalObjectStore, type LocalObjectStore } from './lib/object-store';
import { ROOT } from './lib/processes';

const config = readConfig();
const url = new URL(config.S3_ENDPOINT);
if (url.protocol !== 'http:' || !['127.0.0.1', 'localhost'].includes(url.hostname)) {
  console.error(`[object-store] S3_ENDPOINT must be http:// on loopback for the local fake, got ${config.S3_ENDPOINT}`);
  process.exit(1);
}
const directory = path.resolve(ROOT, process.argv[2] ?? '.data/object-store');
let store: LocalObjectStore;
try {
  store = await startLocalObjectStore({ port: Number(url.port || 80), directory, bucket: config.S3_BUCKET });
} catch (error) {
  console.error(`[object-store] ${error instanceof Error ? error.message : String(error)}`);
  process.exit(1);
}
console.log(
  `[object-store] listening on ${store.endpoint}, bucket ${config.S3_BUCKET}, objects in ${path.relative(ROOT, directory) || directory}`,
);

let stopping = false;
const stop = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  await store.close();
  console.log(`[object-store] stopped (${signal})`);
  process.exit(0);
};
process.once('SIGTERM', () => void stop('SIGTERM'));
process.once('SIGINT', () => void stop('SIGINT'));
