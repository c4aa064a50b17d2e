import { z } from 'zod';
import { calendarDateSchema, idSchema, optionalText } from './common';

export const photoSizeSchema = z.enum(['display', 'thumb']);
export type PhotoSize = z.infer<typeof photoSizeSchema>;

/** The key a browser chooses for one photo upload: a random (v4) uuid. */
export const photoClientKeySchema = z.uuidv4();

/**
 * The form fields that travel with an uploaded photo (multipart). Exactly one of plant,
 * lead or measurement says what the photo shows; the plant follows from the other two.
 */
export const photoUploadFieldsSchema = z
  .object({
    plantId: idSchema.optional(),
    leadId: idSchema.optional(),
    measurementId: idSchema.optional(),
    /** The day the photo shows; a measurement's own date wins, then this, then the camera's date. */
    takenOn: calendarDateSchema.optional(),
    caption: optionalText(200),
    /**
     * A key the sender chose for this upload. Sent again, the upload is stored once; a cancel
     * under the same key removes it, or refuses it if it has not arrived yet. A random (v4)
     * uuid, so the nil and all-ones uuids are refused.
     */
    clientKey: photoClientKeySchema.optional(),
  })
  .strict()
  .refine((fields) => [fields.plantId, fields.leadId, fields.measurementId].filter(Boolean).length === 1, {
    message: 'Say what the photo shows: send exactly one of plantId, leadId or measurementId',
    path: ['plantId'],
  });
export type PhotoUploadFields = z.infer<typeof photoUploadFieldsSchema>;

export const photoListQuerySchema = z
  .object({ plantId: idSchema.optional(), leadId: idSchema.optional() })
  .strict()
  .refine((query) => Boolean(query.plantId) !== Boolean(query.leadId), {
    message: 'Send either plantId or leadId',
    path: ['plantId'],
  });

export const photoSchema = z.object({
  id: z.string(),
  plantId: z.string(),
  leadId: z.string().nullable(),
  measurementId: z.string().nullable(),
  takenOn: calendarDateSchema,
  width: z.number().int(),
  height: z.number().int(),
  thumbWidth: z.number().int(),
  thumbHeight: z.number().int(),
  caption: z.string().nullable(),
  uploadedBy: z.string().nullable(),
  createdAt: z.string(),
  /** Same-origin paths; the server sends the files only to members of the collection. */
  displayUrl: z.string(),
  thumbUrl: z.string(),
});
export type Photo = z.infer<typeof photoSchema>;

/** The answer to cancelling an upload: whether a photo had already been stored and is now removed. */
export const photoUploadCancelSchema = z.object({ removed: z.boolean() });
export type PhotoUploadCancel = z.infer<typeof photoUploadCancelSchema>;

export const photoListSchema = z.object({ items: z.array(photoSchema) });
