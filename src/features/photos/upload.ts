import { ApiError, request } from '@/api/client';
import { uploadForm } from '@/api/upload';
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
 * One multipart POST of a photo. Only the file travels, with what it shows and the upload's
 * key; the server reads the picture itself. Every attempt carries the same key, so a resend
 * is stored once and a cancel (`cancelUpload`) reaches the upload wherever it is.
 */
export function xhrSend(
  collectionId: string,
  file: Blob & { name?: string },
  target: PhotoTarget,
  { clientKey, takenOn }: { clientKey: string; takenOn?: string },
): SendOnce {
  return (onProgress, signal) => {
    const form = new FormData();
    for (const [name, value] of Object.entries(target)) if (value) form.append(name, value);
    if (takenOn) form.append('takenOn', takenOn);
    form.append('clientKey', clientKey);
    form.append('photo', file, file.name ?? 'photo');
    // 201 stored now; 200 a resend of an upload the server already stored under this key.
    return uploadForm(`/collections/${collectionId}/photos`, form, {
      schema: photoSchema,
      signal,
      onProgress: ({ loaded, total }) => onProgress({ loaded, total: total || file.size }),
      droppedMessage: 'The connection dropped while sending the photo',
      fieldReasonFirst: true,
    });
  };
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
