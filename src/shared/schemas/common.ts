import { z } from 'zod';

/** A local calendar date, `YYYY-MM-DD`, with no time of day (and a real day of a real month). */
export const calendarDateSchema = z.iso.date({ error: 'Use a date written YYYY-MM-DD' });

export const idSchema = z.uuid({ error: 'Not a valid id' });

/** Optional free text: trimmed, and an empty string is stored as null. */
export const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max, `At most ${max} characters`)
    .nullish()
    .transform((value) => (value ? value : null));

/** Row version for optimistic concurrency: a save of a stale copy is refused with 409. */
export const versionSchema = z.number({ error: 'Send the version you last read' }).int().min(1).max(2_147_483_647, 'Not a version this server wrote');

export const paginationQuerySchema = z.object({
  page: z.coerce.number().int().min(1, 'Pages start at 1').max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100, 'At most 100 per page').default(25),
});

export const pageSchema = <T extends z.ZodType>(item: T) =>
  z.object({ items: z.array(item), page: z.number().int(), pageSize: z.number().int(), total: z.number().int() });

/** Body of a 409 for a stale save: the record as it now stands, so the client can show it. */
export const staleBodySchema = <T extends z.ZodType>(current: T) =>
  z.object({ error: z.object({ code: z.literal('stale'), message: z.string() }), current });
