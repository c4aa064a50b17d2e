import type { z } from 'zod';
import type { FieldIssue } from '@/shared/schemas/errors';
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
  const unstorable = unstorableText(result.data, where);
  if (unstorable.length > 0) throw new HttpError(400, 'invalid_input', 'Some fields need attention', unstorable);
  return result.data;
}

// A NUL cannot be stored in PostgreSQL text, and a lone UTF-16 surrogate would silently become
// U+FFFD on the way in: both are refused by name rather than failing or changing in the database.
const NUL = /\u0000/;
const LONE_SURROGATE = /[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/;

/** Text in parsed input that cannot be stored as sent, as `{ field, reason }` pairs (at most 20). */
export function unstorableText(value: unknown, where?: 'query' | 'params'): FieldIssue[] {
  const issues: FieldIssue[] = [];
  const stack: { value: unknown; path: string[]; depth: number }[] = [{ value, path: [], depth: 0 }];
  while (stack.length > 0 && issues.length < 20) {
    const { value: v, path, depth } = stack.pop()!;
    if (typeof v === 'string') {
      const reason = NUL.test(v) ? 'Contains a NUL character, which cannot be stored' : LONE_SURROGATE.test(v) ? 'Contains broken Unicode (a lone surrogate)' : null;
      if (reason) {
        const field = path.join('.') || (where ?? 'body');
        issues.push({ field: where && path.length > 0 ? `${where}.${field}` : field, reason });
      }
    } else if (v && typeof v === 'object' && depth < 32) {
      for (const [key, child] of Object.entries(v)) stack.push({ value: child, path: [...path, key], depth: depth + 1 });
    }
  }
  return issues;
}
