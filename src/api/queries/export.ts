import { useMutation, useQueryClient } from '@tanstack/react-query';
import { API_BASE_URL } from '@/lib/env';
import { errorBodySchema } from '@/shared/schemas/errors';
import { type RestoreResult, restoreResultSchema } from '@/shared/schemas/export';
import { ApiError } from '../client';
import { uploadForm } from '../upload';
import { collectionKeys } from './collections';
import { sessionKeys } from './session';

export type ExportKind = 'zip' | 'json';

export interface DownloadedExport {
  blob: Blob;
  fileName: string;
}

export const exportPath = (collectionId: string, kind: ExportKind, withPhotos = true) =>
  `/api/collections/${collectionId}/export.${kind}${kind === 'zip' && !withPhotos ? '?photos=no' : ''}`;

/** The name the server gave the download (Content-Disposition), or a plain one. */
export function fileNameFrom(disposition: string | null, kind: ExportKind): string {
  const match = disposition?.match(/filename\*?=(?:UTF-8'')?"?([^";]+)"?/i);
  const name = match ? decodeURIComponent(match[1]) : '';
  return /^[\w.-]+$/.test(name) ? name : `sympodia-export.${kind}`;
}

async function refusal(response: Response): Promise<ApiError> {
  const parsed = errorBodySchema.safeParse(await response.json().catch(() => null));
  if (parsed.success) return new ApiError(response.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.details);
  return new ApiError(response.status, 'unexpected', `The server answered ${response.status}`);
}

/**
 * Fetches an export with the session cookie, counting bytes as they arrive (the zip is built
 * while it is sent, so its size is not known in advance).
 */
export async function fetchExport(
  collectionId: string,
  kind: ExportKind,
  { withPhotos = true, onProgress }: { withPhotos?: boolean; onProgress?: (received: number) => void } = {},
): Promise<DownloadedExport> {
  let response: Response;
  try {
    response = await fetch(`${API_BASE_URL}${exportPath(collectionId, kind, withPhotos)}`, { credentials: 'include' });
  } catch {
    throw new ApiError(0, 'offline', 'The server could not be reached; check the connection and try again');
  }
  if (!response.ok) throw await refusal(response);
  const fileName = fileNameFrom(response.headers.get('content-disposition'), kind);
  const type = kind === 'zip' ? 'application/zip' : 'application/json';
  if (!response.body) return { blob: await response.blob(), fileName };
  const reader = response.body.getReader();
  const parts: Uint8Array[] = [];
  let received = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      parts.push(value);
      received += value.byteLength;
      onProgress?.(received);
    }
  } catch {
    throw new ApiError(0, 'offline', 'The download broke off before the end; try again');
  }
  return { blob: new Blob(parts as BlobPart[], { type }), fileName };
}

export function useDownloadExportMutation(collectionId: string) {
  return useMutation({
    mutationFn: (input: { kind: ExportKind; withPhotos?: boolean; onProgress?: (received: number) => void }) =>
      fetchExport(collectionId, input.kind, input),
  });
}

export interface RestoreProgress {
  sent: number;
  total: number;
}

/** Sends the export file as an upload, with its progress. */
export function sendRestore(collectionId: string, file: Blob & { name?: string }, onProgress: (progress: RestoreProgress) => void): Promise<RestoreResult> {
  const form = new FormData();
  form.append('document', file, file.name ?? 'export.json');
  return uploadForm(`/collections/${collectionId}/restore`, form, {
    schema: restoreResultSchema,
    onProgress: ({ loaded, total }) => onProgress({ sent: loaded, total: total || file.size }),
    droppedMessage: 'The connection dropped while sending the file; nothing was restored',
  });
}

export function useRestoreMutation(collectionId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: { file: Blob & { name?: string }; onProgress: (progress: RestoreProgress) => void }) =>
      sendRestore(collectionId, input.file, input.onProgress),
    // Everything about the collection changed: its settings, records and every answer drawn from them.
    onSuccess: async () => {
      await client.invalidateQueries({ queryKey: collectionKeys.detail(collectionId) });
      await client.invalidateQueries({ queryKey: sessionKeys.me });
    },
  });
}
