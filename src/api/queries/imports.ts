import { useMutation, useQueryClient } from '@tanstack/react-query';
import { ApiError, request } from '@/api/client';
import { API_BASE_URL } from '@/lib/env';
import { errorBodySchema } from '@/shared/schemas/errors';
import {
  type ImportCheck,
  importCheckSchema,
  type ImportOptionsInput,
  type ImportProgressLine,
  importProgressLineSchema,
  mappingAnswerSchema,
} from '@/shared/schemas/imports';

const importPath = (collectionId: string, tail: string, options: ImportOptionsInput) =>
  `${API_BASE_URL}/api/collections/${collectionId}/imports${tail}?options=${encodeURIComponent(JSON.stringify(options))}`;

function refusal(status: number, body: unknown): ApiError {
  const parsed = errorBodySchema.safeParse(body);
  if (parsed.success) return new ApiError(status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.details);
  return new ApiError(status, 'unexpected', `The server answered ${status}`);
}

/** The remembered (or guessed) mapping for a header row. */
export function useImportMappingMutation(collectionId: string) {
  return useMutation({
    mutationFn: (headers: string[]) =>
      request(`/collections/${collectionId}/imports/mapping`, { method: 'POST', body: { headers }, schema: mappingAnswerSchema }),
  });
}

/** The dry run: the whole file goes up as the raw body; nothing is stored. */
export async function checkImportFile(collectionId: string, file: Blob, options: ImportOptionsInput, signal?: AbortSignal): Promise<ImportCheck> {
  let response: Response;
  try {
    response = await fetch(importPath(collectionId, '/check', options), {
      method: 'POST',
      credentials: 'include',
      headers: { 'Content-Type': 'text/csv' },
      body: file,
      signal,
    });
  } catch (error) {
    if ((error as { name?: string }).name === 'AbortError') throw error;
    throw new ApiError(0, 'offline', 'The server could not be reached; check the connection and try again');
  }
  const body = await response.json().catch(() => null);
  if (!response.ok) throw refusal(response.status, body);
  return importCheckSchema.parse(body);
}

export interface ImportProgress {
  phase: 'sending' | 'writing';
  done: number;
  total: number;
}

/**
 * The import itself, through XMLHttpRequest so both halves show progress: the upload's bytes,
 * then the server's NDJSON `writing` lines as its batches are stored.
 */
export function runImportFile(collectionId: string, file: Blob, options: ImportOptionsInput, onProgress: (p: ImportProgress) => void) {
  return new Promise<Extract<ImportProgressLine, { phase: 'done' }>['counts']>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', importPath(collectionId, '', options));
    xhr.withCredentials = true;
    xhr.setRequestHeader('Content-Type', 'text/csv');
    let seen = 0;
    let last: ImportProgressLine | undefined;
    const readLines = () => {
      if (xhr.status !== 200) return;
      const text = xhr.responseText;
      const end = text.lastIndexOf('\n');
      if (end < seen) return;
      for (const line of text.slice(seen, end).split('\n')) {
        if (!line.trim()) continue;
        const parsed = importProgressLineSchema.safeParse(JSON.parse(line));
        if (!parsed.success) continue;
        last = parsed.data;
        if (parsed.data.phase === 'writing') onProgress({ phase: 'writing', done: parsed.data.done, total: parsed.data.total });
      }
      seen = end + 1;
    };
    xhr.upload.onprogress = (event) => onProgress({ phase: 'sending', done: event.loaded, total: event.lengthComputable ? event.total : file.size });
    xhr.onprogress = readLines;
    xhr.onerror = () => reject(new ApiError(0, 'offline', 'The connection dropped; nothing was saved unless the import finished. Check the file again to see.'));
    xhr.onload = () => {
      if (xhr.status !== 200) {
        let body: unknown = null;
        try {
          body = JSON.parse(xhr.responseText);
        } catch {
          body = null;
        }
        return reject(refusal(xhr.status, body));
      }
      readLines();
      if (last?.phase === 'done') resolve(last.counts);
      else if (last?.phase === 'failed') reject(new ApiError(500, last.error.code, last.error.message));
      else reject(new ApiError(500, 'unexpected', 'The import ended without a result; check the file again to see what was saved'));
    };
    xhr.send(file);
  });
}

/** After an import every list and forecast of the collection may have changed. */
export function useForgetCollectionData(collectionId: string) {
  const client = useQueryClient();
  return () => client.invalidateQueries({ queryKey: ['collections', collectionId] });
}
