import { eq } from 'drizzle-orm';
import { Router } from 'express';
import { meSchema } from '@/shared/schemas/auth';
import { completePasswordResetInputSchema, requestPasswordResetInputSchema } from '@/shared/schemas/mail';
import { users } from '../../db/schema';
import type { AppContext } from '../context';
import { HttpError } from '../errors';
import { clearSignInCounts, consume, limitByIp } from '../middleware/rate-limit';
import { setSessionCookie } from '../middleware/session';
import { isCommonPassword } from '../passwords';
import { collectionsOf } from '../services/collections';
import { completePasswordReset, requestPasswordReset } from '../services/password-reset';
import { parse } from '../validate';

export function passwordResetRoutes(ctx: AppContext): Router {
  const { db, auth, mailer, rateLimits, logger } = ctx;
  const router = Router();

  router.post('/auth/password-reset', limitByIp(rateLimits.mailIp), async (req, res) => {
    const { email } = parse(requestPasswordResetInputSchema, req.body);
    await consume(rateLimits.mailAccount, `reset:${email}`);
    // Not awaited: the answer leaves before the lookup and the mail, known address or not.
    requestPasswordReset(db, mailer, email).catch((error: unknown) => logger.error({ err: error }, 'password reset mail failed'));
    res.status(202).json({ message: 'If an account uses this address, a link to set a new password is on its way' });
  });

  router.post('/auth/password-reset/complete', limitByIp(rateLimits.authIp), async (req, res) => {
    const input = parse(completePasswordResetInputSchema, req.body);
    if (isCommonPassword(input.password)) {
      throw new HttpError(400, 'invalid_input', 'Some fields need attention', [
        { field: 'password', reason: 'This password is on a list of commonly used passwords; choose another' },
      ]);
    }
    const userId = await completePasswordReset(db, input.token, input.password);
    await auth.invalidateUserSessions(userId);
    const session = await auth.createSession(userId, {});
    setSessionCookie(auth, req, res, session.id);
    const [user] = await db.select().from(users).where(eq(users.id, userId));
    // Whoever could read the mail owns the account: a sign-in pause for it ends here.
    await clearSignInCounts(rateLimits, user.email, req.ip ?? 'unknown');
    res.json(meSchema.parse({ user: { id: user.id, email: user.email, displayName: user.displayName }, collections: await collectionsOf(db, userId) }));
  });

  return router;
}
