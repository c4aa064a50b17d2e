import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { fieldIssues } from '../../../server/errors';

describe('fieldIssues', () => {
  const schema = z.object({ name: z.string(), items: z.array(z.number()) });

  it('names nested fields with dotted paths', () => {
    const result = schema.safeParse({ name: 1, items: [1, 'two'] });
    expect(result.success).toBe(false);
    const issues = fieldIssues(result.error!);
    expect(issues.map((i) => i.field).sort()).toEqual(['items.1', 'name']);
    expect(issues.every((i) => i.reason.length > 0)).toBe(true);
  });

  it('prefixes path and query input', () => {
    const result = z.object({ page: z.number() }).safeParse({ page: 'x' });
    expect(fieldIssues(result.error!, 'query')[0].field).toBe('query.page');
  });

  it('calls a whole-body problem "body"', () => {
    const result = schema.safeParse('not an object');
    expect(fieldIssues(result.error!)[0].field).toBe('body');
  });
});
