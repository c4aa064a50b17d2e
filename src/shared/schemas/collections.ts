import { z } from 'zod';
import { roleSchema } from './auth';

export const unitsSchema = z.enum(['mm', 'in']);

export const collectionSchema = z.object({
  id: z.uuid(),
  name: z.string(),
  seasonStartMonth: z.number().int().min(1).max(12),
  units: unitsSchema,
  latitude: z.number().nullable(),
  longitude: z.number().nullable(),
  role: roleSchema,
});

export const collectionNameSchema = z
  .string({ error: 'Enter a name' })
  .trim()
  .min(1, 'Enter a name')
  .max(120, 'A name has at most 120 characters');

export const createCollectionInputSchema = z.object({
  name: collectionNameSchema,
  seasonStartMonth: z.number().int().min(1, 'Month 1 to 12').max(12, 'Month 1 to 12').optional(),
  units: unitsSchema.optional(),
});

export const updateCollectionInputSchema = z
  .object({
    name: collectionNameSchema,
    seasonStartMonth: z.number().int().min(1, 'Month 1 to 12').max(12, 'Month 1 to 12'),
    units: unitsSchema,
    latitude: z.number().min(-90, 'Latitude is between -90 and 90').max(90, 'Latitude is between -90 and 90').nullable(),
    longitude: z
      .number()
      .min(-180, 'Longitude is between -180 and 180')
      .max(180, 'Longitude is between -180 and 180')
      .nullable(),
  })
  .partial()
  .refine((value) => Object.keys(value).length > 0, { message: 'Nothing to change' });

export const memberSchema = z.object({
  userId: z.string(),
  email: z.string(),
  displayName: z.string(),
  role: roleSchema,
});

export const updateMemberInputSchema = z.object({ role: roleSchema });

export type Collection = z.infer<typeof collectionSchema>;
export type CreateCollectionInput = z.infer<typeof createCollectionInputSchema>;
export type UpdateCollectionInput = z.infer<typeof updateCollectionInputSchema>;
export type Member = z.infer<typeof memberSchema>;
