import { z } from 'zod';
import { emailSchema, newPasswordSchema, roleSchema } from './auth';

export const createInvitationInputSchema = z.object({ email: emailSchema, role: roleSchema });

/** A pending invitation as its collection's owners see it. */
export const invitationSchema = z.object({
  id: z.uuid(),
  email: z.string(),
  role: roleSchema,
  invitedBy: z.string().nullable(),
  expiresAt: z.string(),
  createdAt: z.string(),
});

/** What the invitation link shows before it is accepted (no token, no ids). */
export const invitationPreviewSchema = z.object({
  collectionName: z.string(),
  role: roleSchema,
  email: z.string(),
  invitedBy: z.string().nullable(),
  expiresAt: z.string(),
});

export const acceptedInvitationSchema = z.object({ collectionId: z.uuid(), role: roleSchema });

/** A token from a mailed link: base64url of 32 bytes is 43 characters. */
export const mailTokenSchema = z.string().regex(/^[A-Za-z0-9_-]{43}$/, 'This link is not complete; copy the whole link from the mail');

export const confirmSignUpInputSchema = z.object({ token: mailTokenSchema });

export const requestPasswordResetInputSchema = z.object({ email: emailSchema });
export const completePasswordResetInputSchema = z.object({ token: mailTokenSchema, password: newPasswordSchema });

export const digestSettingSchema = z.object({ optedOut: z.boolean() });

export type CreateInvitationInput = z.infer<typeof createInvitationInputSchema>;
export type Invitation = z.infer<typeof invitationSchema>;
export type InvitationPreview = z.infer<typeof invitationPreviewSchema>;
export type AcceptedInvitation = z.infer<typeof acceptedInvitationSchema>;
export type DigestSetting = z.infer<typeof digestSettingSchema>;
