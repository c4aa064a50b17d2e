import type { z } from 'zod';
import { errorBodySchema, type FieldIssue } from '@/shared/schemas/errors';
import { API_BASE_URL } from '@/lib/env';

/** A refused or failed API call, with the server's code and per-field reasons. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details: FieldIssue[] = [],
  ) {
    super(message);
  }

  /** The reason given for one field, for showing under that input. */
  fieldError(field: string): string | undefined {
    return this.details.find((d) => d.field === field)?.reason;
  }
}

interface RequestOptions<S extends z.ZodType | undefined> {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  body?: unknown;
  schema?: S;
  signal?: AbortSignal;
}

/**
 * The one way the client talks to the server. Every response body is parsed with the
 * shared schema, so a contract drift fails loudly instead of rendering wrong data.
 */
export async function request<S extends z.ZodType | undefined = undefined>(
  path: string,
  { method = 'GET', body, schema, signal }: RequestOptions<S> = {},
): Promise<S extends z.ZodType ? z.infer<S> : void> {
  let response: Response;
  try {
    response = await fetch(`${API_BASE_URL}/api${path}`, {
      method,
      credentials: 'include',
      headers: body === undefined ? undefined : { 'Content-Type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
      signal,
    });
  } catch (error) {
    if ((error as { name?: string }).name === 'AbortError') throw error;
    throw new ApiError(0, 'offline', 'The server could not be reached; check the connection and try again');
  }

  if (!response.ok) {
    const parsed = errorBodySchema.safeParse(await response.json().catch(() => null));
    if (parsed.success) {
      const { code, message, details } = parsed.data.error;
      throw new ApiError(response.status, code, message, details);
    }
    throw new ApiError(response.status, 'unexpected', `The server answered ${response.status}`);
  }
  if (response.status === 204 || !schema) return undefined as never;
  return schema.parse(await response.json()) as never;
}
