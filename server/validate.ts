import type { z } from 'zod';
import { fieldIssues, HttpError } from './errors';

/**
 * Parses untrusted input with a shared schema; a failure becomes a 400 naming each field.
 * `where` prefixes the field names for path and query input ("query.page").
 */
export function parse<S extends z.ZodType>(schema: S, input: unknown, where?: 'query' | 'params'): z.infer<S> {
  const result = schema.safeParse(input ?? (where ? {} : undefined));
  if (!result.success) {
    throw new HttpError(400, 'invalid_input', 'Some fields need attention', fieldIssues(result.error, where));
  }
  return result.data;
}
