import type { z } from 'zod';
import { API_BASE_URL } from '@/lib/env';
import { errorBodySchema } from '@/shared/schemas/errors';
import { ApiError } from './client';

export interface UploadProgress {
  loaded: number;
  total: number;
}

export interface UploadOptions<S extends z.ZodType> {
  /** The answer's shape on success (any 2xx). */
  schema: S;
  onProgress?: (progress: UploadProgress) => void;
  /** Aborting rejects with an error named AbortError. */
  signal?: AbortSignal;
  /** The message of the status-0 ApiError when the connection drops. */
  droppedMessage: string;
  /** Show a refusal's first field reason ("The file is larger than 20 MB") instead of its general message. */
  fieldReasonFirst?: boolean;
}

/**
 * One multipart POST to the API through XMLHttpRequest, which (unlike fetch) reports upload
 * progress. Answers as `request` does: the parsed body on success, else an ApiError with the
 * server's code and field reasons (status 0 when the connection dropped).
 */
export function uploadForm<S extends z.ZodType>(path: string, form: FormData, options: UploadOptions<S>): Promise<z.infer<S>> {
  const { schema, onProgress, signal, droppedMessage, fieldReasonFirst = false } = options;
  const cancelled = () => Object.assign(new Error('Upload cancelled'), { name: 'AbortError' });
  return new Promise((resolve, reject) => {
    if (signal?.aborted) return reject(cancelled());
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `${API_BASE_URL}/api${path}`);
    xhr.withCredentials = true;
    if (onProgress) xhr.upload.onprogress = (event) => onProgress({ loaded: event.loaded, total: event.lengthComputable ? event.total : 0 });
    xhr.onerror = () => reject(new ApiError(0, 'offline', droppedMessage));
    xhr.onabort = () => reject(cancelled());
    xhr.onload = () => {
      let body: unknown = null;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        body = null;
      }
      if (xhr.status >= 200 && xhr.status < 300) {
        const answer = schema.safeParse(body);
        if (answer.success) return resolve(answer.data);
        return reject(new ApiError(xhr.status, 'unexpected', 'The server’s answer could not be read'));
      }
      const refusal = errorBodySchema.safeParse(body);
      if (refusal.success) {
        const { code, message, details } = refusal.data.error;
        return reject(new ApiError(xhr.status, code, (fieldReasonFirst ? details?.[0]?.reason : undefined) ?? message, details));
      }
      reject(new ApiError(xhr.status, 'unexpected', `The server answered ${xhr.status}`));
    };
    signal?.addEventListener('abort', () => xhr.abort(), { once: true });
    xhr.send(form);
  });
}
