import { ApiError, request } from '@/api/client';
import { API_BASE_URL } from '@/lib/env';
import { errorBodySchema } from '@/shared/schemas/errors';
import { type Photo, type PhotoUploadCancel, photoSchema, photoUploadCancelSchema } from '@/shared/schemas/photos';

export interface Progress {
  loaded: number;
  total: number;
}

/** One attempt at sending a photo; rejects with an ApiError (status 0 for a dropped connection). */
export type SendOnce = (onProgress: (progress: Progress) => void, signal: AbortSignal) => Promise<Photo>;

/** A connection that drops mid-upload is tried once more (the rule); a refusal is final. */
export const UPLOAD_RETRIES = 1;

export const isCancelled = (error: unknown) => (error as { name?: string } | null)?.name === 'AbortError';

/**
 * Sends with `send`, retrying a dropped connection up to `retries` times. A cancel (the
 * signal) and any answer from the server — a 4xx refusal, a 5xx — end it at once.
 */
export async function uploadWithRetry(
  send: SendOnce,
  { onProgress, signal, retries = UPLOAD_RETRIES }: { onProgress: (progress: Progress) => void; signal: AbortSignal; retries?: number },
): Promise<Photo> {
  for (let attempt = 0; ; attempt += 1) {
    try {
      return await send(onProgress, signal);
    } catch (error) {
      const dropped = error instanceof ApiError && error.status === 0;
      if (!dropped || signal.aborted || attempt >= retries) throw error;
    }
  }
}

export interface PhotoTarget {
  plantId?: string;
  leadId?: string;
  measurementId?: string;
}

/**
 * One multipart POST through XMLHttpRequest, which (unlike fetch) reports upload progress.
 * Only the file travels, with what it shows and the upload's key; the server reads the
 * picture itself. Every attempt carries the same key, so a resend is stored once and a
 * cancel (`cancelUpload`) reaches the upload wherever it is.
 */
export function xhrSend(
  collectionId: string,
  file: Blob & { name?: string },
  target: PhotoTarget,
  { clientKey, takenOn }: { clientKey: string; takenOn?: string },
): SendOnce {
  return (onProgress, signal) =>
    new Promise<Photo>((resolve, reject) => {
      const form = new FormData();
      for (const [name, value] of Object.entries(target)) if (value) form.append(name, value);
      if (takenOn) form.append('takenOn', takenOn);
      form.append('clientKey', clientKey);
      form.append('photo', file, file.name ?? 'photo');

      const xhr = new XMLHttpRequest();
      xhr.open('POST', `${API_BASE_URL}/api/collections/${collectionId}/photos`);
      xhr.withCredentials = true;
      xhr.upload.onprogress = (event) => onProgress({ loaded: event.loaded, total: event.lengthComputable ? event.total : file.size });
      xhr.onerror = () => reject(new ApiError(0, 'offline', 'The connection dropped while sending the photo'));
      xhr.onabort = () => reject(Object.assign(new Error('Upload cancelled'), { name: 'AbortError' }));
      xhr.onload = () => {
        let body: unknown = null;
        try {
          body = JSON.parse(xhr.responseText);
        } catch {
          body = null;
        }
        // 200: a resend of an upload the server already stored under this key.
        if (xhr.status === 201 || xhr.status === 200) {
          const photo = photoSchema.safeParse(body);
          if (photo.success) return resolve(photo.data);
          return reject(new ApiError(xhr.status, 'unexpected', 'The server’s answer could not be read'));
        }
        const refusal = errorBodySchema.safeParse(body);
        if (refusal.success) {
          const { code, message, details } = refusal.data.error;
          // A field's reason says more than the general message ("The file is larger than 20 MB").
          return reject(new ApiError(xhr.status, code, details?.[0]?.reason ?? message, details));
        }
        reject(new ApiError(xhr.status, 'unexpected', `The server answered ${xhr.status}`));
      };
      if (signal.aborted) return xhr.onabort?.(new ProgressEvent('abort'));
      signal.addEventListener('abort', () => xhr.abort(), { once: true });
      xhr.send(form);
    });
}

/**
 * Tells the server that the upload sent under `clientKey` is cancelled. An upload still on
 * its way is then refused; one that had already been stored is removed (`removed: true`).
 */
export function cancelUpload(collectionId: string, clientKey: string): Promise<PhotoUploadCancel> {
  return request(`/collections/${collectionId}/photo-uploads/${clientKey}`, { method: 'DELETE', schema: photoUploadCancelSchema });
}

/** A short, readable size: "3.4 MB", "820 KB". */
export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
  return `${Math.max(1, Math.round(bytes / 1024))} KB`;
}
