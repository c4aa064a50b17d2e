import { z } from 'zod';

/** Fewer characters than this are refused; length matters more than symbols (NIST SP 800-63B). */
export const PASSWORD_MIN_LENGTH = 10;
/** Shown under every field where a new password is chosen. */
export const NEW_PASSWORD_HINT = `At least ${PASSWORD_MIN_LENGTH} characters; a few unrelated words are easy to remember`;
export const PASSWORD_MAX_LENGTH = 200;

export const emailSchema = z
  .string({ error: 'Enter your e-mail address' })
  .trim()
  .toLowerCase()
  .max(254, 'An e-mail address has at most 254 characters')
  .pipe(z.email({ error: 'Enter a valid e-mail address' }));

export const newPasswordSchema = z
  .string({ error: 'Enter a password' })
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(PASSWORD_MAX_LENGTH, `Use at most ${PASSWORD_MAX_LENGTH} characters`);

/** A page of the app a mailed sign-up link brings the new account back to: an invitation or a hand-off. */
export const returnPathSchema = z.string().regex(/^\/(invite|handoff)\/[A-Za-z0-9_-]{43}$/, 'Return only to an invitation or hand-off page');

export const signUpInputSchema = z.object({
  email: emailSchema,
  password: newPasswordSchema,
  displayName: z
    .string({ error: 'Enter your name' })
    .trim()
    .min(1, 'Enter your name')
    .max(80, 'A name has at most 80 characters'),
  next: returnPathSchema.optional(),
});

/**
 * POST /api/auth/sign-up's answer, the same whether the address is new or already has an account:
 * the account is made when the link mailed to the address is followed.
 */
export const signUpRequestedSchema = z.object({ message: z.string(), email: z.string() });

export const signInInputSchema = z.object({
  email: emailSchema,
  password: z.string({ error: 'Enter your password' }).min(1, 'Enter your password').max(PASSWORD_MAX_LENGTH),
});

export const roleSchema = z.enum(['owner', 'grower', 'viewer']);

export const collectionSummarySchema = z.object({
  id: z.uuid(),
  name: z.string(),
  role: roleSchema,
});

export const userSchema = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
});

export const meSchema = z.object({
  user: userSchema,
  collections: z.array(collectionSummarySchema),
});

/** POST /api/auth/sign-up/confirm's answer: the new account, signed in, and where to go next. */
export const signUpConfirmedSchema = meSchema.extend({ next: returnPathSchema.nullable() });

/** GET /api/session: who is signed in in this browser, or `me: null`. */
export const sessionSchema = z.object({ me: meSchema.nullable() });

/**
 * What a page of the app is served with: who is signed in (absent when the server could not
 * tell), the collection its screens were drawn in, the first screen's API answers by path, and
 * the date it was drawn on.
 */
export const pageDataSchema = z.object({
  me: meSchema.nullable().optional(),
  collectionId: z.string().optional(),
  responses: z.record(z.string(), z.unknown()).optional(),
  /** When the server asked for those answers (ms since 1970). */
  answeredAt: z.number().optional(),
  /** The server's calendar date when it drew the page (`YYYY-MM-DD`). */
  today: z.string().optional(),
  /** Whether the page was drawn in the wide layout (the browser's last, from its cookie). */
  wide: z.boolean().optional(),
});

export type SignUpInput = z.infer<typeof signUpInputSchema>;
export type SignInInput = z.infer<typeof signInInputSchema>;
export type Role = z.infer<typeof roleSchema>;
export type CollectionSummary = z.infer<typeof collectionSummarySchema>;
export type User = z.infer<typeof userSchema>;
export type Me = z.infer<typeof meSchema>;
export type PageData = z.infer<typeof pageDataSchema>;
