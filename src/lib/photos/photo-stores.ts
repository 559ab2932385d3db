import type { AppConfig } from '../config';
import { getConfig } from '../config';
import type { PhotoStore } from './photo-store';
import { createS3PhotoStore } from './photos.s3-storage';
import { createDiskPhotoStore } from './photos.storage';

/** The photo store the settings name: the S3 API (PHOTO_STORE=s3, the default) or the local disk. */
export function createPhotoStore(config: AppConfig): PhotoStore {
  if (config.PHOTO_STORE === 'disk') return createDiskPhotoStore(config.UPLOAD_DIR);
  return createS3PhotoStore({
    endpoint: config.S3_ENDPOINT,
    region: config.S3_REGION,
    bucket: config.S3_BUCKET,
    accessKeyId: config.S3_ACCESS_KEY_ID,
    secretAccessKey: config.S3_SECRET_ACCESS_KEY,
    forcePathStyle: config.S3_FORCE_PATH_STYLE,
  });
}

// One store per process, for routes; services take the store as an argument like they take `db`.
let instance: PhotoStore | undefined;

/** The process's photo store, made on first use from the settings. */
export function getPhotoStore(): PhotoStore {
  instance ??= createPhotoStore(getConfig());
  return instance;
}
