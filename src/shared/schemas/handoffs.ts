import { z } from 'zod';
import { emailSchema } from './auth';
import { collectionNameSchema } from './collections';
import { calendarDateSchema } from './common';

/** How long a hand-off link works. */
export const HANDOFF_LIFETIME_DAYS = 14;

export const createHandoffInputSchema = z.object({
  email: emailSchema,
  note: z
    .string()
    .trim()
    .max(1000, 'A note has at most 1,000 characters')
    .optional()
    .transform((v) => (v ? v : null)),
});

/** A pending hand-off as the giver's collection sees it. */
export const handoffSchema = z.object({
  id: z.uuid(),
  plantId: z.uuid(),
  plantTag: z.string(),
  recipientEmail: z.string(),
  note: z.string().nullable(),
  sentBy: z.string().nullable(),
  /** Whether the person asking may withdraw it (the sender or an owner). */
  canRevoke: z.boolean(),
  expiresAt: z.string(),
  createdAt: z.string(),
});

/** What comes with the division: counts of the copied history and of the division's own records. */
export const handoffContentsSchema = z.object({
  /** Ancestors copied as read-only history (parent, grandparent, …). */
  historyPlants: z.number().int().nonnegative(),
  historyLeads: z.number().int().nonnegative(),
  historyMeasurements: z.number().int().nonnegative(),
  historyBlooms: z.number().int().nonnegative(),
  ownLeads: z.number().int().nonnegative(),
  ownMeasurements: z.number().int().nonnegative(),
  ownBlooms: z.number().int().nonnegative(),
  photos: z.number().int().nonnegative(),
});

/** What the hand-off link shows before it is accepted (no token, no ids). */
export const handoffPreviewSchema = z.object({
  plantName: z.string(),
  plantTag: z.string(),
  givenBy: z.string().nullable(),
  recipientEmail: z.string(),
  note: z.string().nullable(),
  dividedOn: calendarDateSchema.nullable(),
  expiresAt: z.string(),
  contents: handoffContentsSchema,
});

/** Exactly one of: a collection of the recipient's (owner or grower there), or a name for a new one. */
export const acceptHandoffInputSchema = z
  .object({
    collectionId: z.uuid({ error: 'Choose one of your collections' }).optional(),
    newCollectionName: collectionNameSchema.optional(),
  })
  .refine((v) => (v.collectionId === undefined) !== (v.newCollectionName === undefined), {
    path: ['collectionId'],
    message: 'Choose one of your collections or name a new one (one of the two)',
  });

export const acceptedHandoffSchema = z.object({
  collectionId: z.uuid(),
  plantId: z.uuid(),
  tag: z.string(),
  /** The division's own tag when it clashed in the chosen collection and was changed; else null. */
  tagChangedFrom: z.string().nullable(),
  contents: handoffContentsSchema,
});

export type CreateHandoffInput = z.input<typeof createHandoffInputSchema>;
export type Handoff = z.infer<typeof handoffSchema>;
export type HandoffContents = z.infer<typeof handoffContentsSchema>;
export type HandoffPreview = z.infer<typeof handoffPreviewSchema>;
export type AcceptHandoffInput = z.infer<typeof acceptHandoffInputSchema>;
export type AcceptedHandoff = z.infer<typeof acceptedHandoffSchema>;
