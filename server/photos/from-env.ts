import path from 'node:path';
import type { ServerEnv } from '../env';
import { localDiskStore, type PhotoStore, s3Store } from './store';

/** The photo store the environment asks for (see DEVELOPERS.md, "Photos"). */
export function photoStoreFromEnv(env: ServerEnv): PhotoStore {
  if (env.PHOTO_STORE === 's3') {
    return s3Store({
      endpoint: env.S3_ENDPOINT,
      region: env.S3_REGION,
      bucket: env.S3_BUCKET!,
      accessKeyId: env.S3_ACCESS_KEY_ID,
      secretAccessKey: env.S3_SECRET_ACCESS_KEY,
      forcePathStyle: env.S3_FORCE_PATH_STYLE,
    });
  }
  return localDiskStore(path.resolve(env.PHOTO_DIR ?? path.join(__dirname, '..', '..', '.data', 'photos')));
}
