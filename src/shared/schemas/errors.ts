import { z } from 'zod';

/** One failing field: `field` is a dotted path into the request ("email", "body.items.0"). */
export const fieldIssueSchema = z.object({
  field: z.string(),
  reason: z.string(),
});

/** The one shape of every error body the API sends. */
export const errorBodySchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.array(fieldIssueSchema).optional(),
  }),
});

export type FieldIssue = z.infer<typeof fieldIssueSchema>;
export type ErrorBody = z.infer<typeof errorBodySchema>;
