import { randomBytes } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';
import {
  DeleteObjectsCommand,
  GetObjectCommand,
  NoSuchKey,
  PutObjectCommand,
  S3Client,
} from '@aws-sdk/client-s3';
import { HttpError } from '../errors';

/**
 * Where photo files live. Keys are made by the server from ids alone
 * (`<collectionId>/<photoId>/<size>.webp`); nothing a client sends becomes part of a key.
 */
export interface PhotoStore {
  readonly kind: 'local' | 's3';
  put(key: string, body: Buffer, contentType: string): Promise<void>;
  /** The stored bytes, or null when there is no such file. */
  get(key: string): Promise<Buffer | null>;
  delete(keys: string[]): Promise<void>;
}

const KEY_PATTERN = /^[0-9a-f-]{36}\/[0-9a-f-]{36}\/(display|thumb)\.webp$/;

function checkKey(key: string): string {
  if (!KEY_PATTERN.test(key)) throw new Error(`Refusing a photo key that the server did not make: ${key}`);
  return key;
}

/** The store could not take the file (disk full, folder not writable, object store down). */
export const storageUnavailable = () =>
  new HttpError(503, 'photo_storage_unavailable', 'Photos cannot be saved right now (the photo store is full or not writable); nothing was saved');

/** Files under one folder on this machine: the default, for a single server. */
export function localDiskStore(root: string): PhotoStore {
  const file = (key: string) => path.join(root, checkKey(key));
  return {
    kind: 'local',
    async put(key, body) {
      const target = file(key);
      // Written beside the target and renamed, so a reader never sees half a file.
      const partial = `${target}.${randomBytes(6).toString('hex')}.partial`;
      try {
        await fs.mkdir(path.dirname(target), { recursive: true });
        await fs.writeFile(partial, body, { flag: 'wx' });
        await fs.rename(partial, target);
      } catch (error) {
        await fs.rm(partial, { force: true }).catch(() => {});
        throw Object.assign(storageUnavailable(), { cause: error });
      }
    },
    async get(key) {
      try {
        return await fs.readFile(file(key));
      } catch (error) {
        if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
        throw error;
      }
    },
    async delete(keys) {
      const folders = new Set<string>();
      for (const key of keys) {
        await fs.rm(file(key), { force: true });
        folders.add(path.dirname(file(key)));
      }
      // The photo's folder goes once it is empty; a folder still holding files stays.
      for (const folder of folders) await fs.rmdir(folder).catch(() => {});
    },
  };
}

export interface S3Settings {
  endpoint?: string;
  region: string;
  bucket: string;
  accessKeyId?: string;
  secretAccessKey?: string;
  /** Path-style addressing (`endpoint/bucket/key`), which most S3-compatible stores want. */
  forcePathStyle: boolean;
}

/** Any S3-compatible object store: the store to use when more than one server runs. */
export function s3Store(settings: S3Settings): PhotoStore {
  const client = new S3Client({
    endpoint: settings.endpoint,
    region: settings.region,
    forcePathStyle: settings.forcePathStyle,
    credentials:
      settings.accessKeyId && settings.secretAccessKey
        ? { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey }
        : undefined,
    // Checksums only where the API requires them: many S3-compatible stores do not know the newer headers.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
  });
  const Bucket = settings.bucket;
  return {
    kind: 's3',
    async put(key, body, contentType) {
      try {
        await client.send(new PutObjectCommand({ Bucket, Key: checkKey(key), Body: body, ContentType: contentType }));
      } catch (error) {
        throw Object.assign(storageUnavailable(), { cause: error });
      }
    },
    async get(key) {
      try {
        const object = await client.send(new GetObjectCommand({ Bucket, Key: checkKey(key) }));
        return object.Body ? Buffer.from(await object.Body.transformToByteArray()) : null;
      } catch (error) {
        if (error instanceof NoSuchKey || (error as { name?: string }).name === 'NoSuchKey') return null;
        throw error;
      }
    },
    async delete(keys) {
      if (keys.length === 0) return;
      await client.send(new DeleteObjectsCommand({ Bucket, Delete: { Objects: keys.map((key) => ({ Key: checkKey(key) })), Quiet: true } }));
    },
  };
}
