import { eq } from 'drizzle-orm';
import { Router } from 'express';
import { generateIdFromEntropySize } from 'lucia';
import { signInInputSchema, signUpInputSchema } from '@/shared/schemas/auth';
import { users } from '../../db/schema';
import { hashPassword, verifyPassword } from '../auth';
import type { AppContext } from '../context';
import { HttpError } from '../errors';
import { requireUser } from '../middleware/access';
import { consume, limitByIp } from '../middleware/rate-limit';
import { setSessionCookie } from '../middleware/session';
import { isCommonPassword } from '../passwords';
import { createCollectionFor } from '../services/collections';
import { describeMe } from '../services/me';
import { parse } from '../validate';

const UNIQUE_VIOLATION = '23505';

export function authRoutes(ctx: AppContext): Router {
  const { db, auth, rateLimits } = ctx;
  const router = Router();

  const me = (user: { id: string; email: string; displayName: string }) => describeMe(db, user);

  router.post('/auth/sign-up', limitByIp(rateLimits.authIp), async (req, res) => {
    const input = parse(signUpInputSchema, req.body);
    await consume(rateLimits.authAccount, `sign-up:${input.email}`);
    if (isCommonPassword(input.password)) {
      throw new HttpError(400, 'invalid_input', 'Some fields need attention', [
        { field: 'password', reason: 'This password is on a list of commonly used passwords; choose another' },
      ]);
    }
    const [taken] = await db.select({ id: users.id }).from(users).where(eq(users.email, input.email)).limit(1);
    if (taken) throw new HttpError(409, 'email_taken', 'An account with this e-mail already exists; sign in instead');

    const passwordHash = await hashPassword(input.password);
    const userId = generateIdFromEntropySize(10);
    try {
      await db.transaction(async (tx) => {
        await tx.insert(users).values({ id: userId, email: input.email, displayName: input.displayName, passwordHash });
        await createCollectionFor(tx, userId, { name: `${input.displayName}’s collection` });
      });
    } catch (error) {
      if ((error as { code?: string }).code === UNIQUE_VIOLATION) {
        throw new HttpError(409, 'email_taken', 'An account with this e-mail already exists; sign in instead');
      }
      throw error;
    }
    await rotateSession(req, res, userId);
    res.status(201).json(await me({ id: userId, email: input.email, displayName: input.displayName }));
  });

  router.post('/auth/sign-in', limitByIp(rateLimits.authIp), async (req, res) => {
    const input = parse(signInInputSchema, req.body);
    const attempts = await rateLimits.authAccount.get(input.email);
    if (attempts && attempts.remainingPoints <= 0) {
      throw new HttpError(429, 'rate_limited', 'Too many attempts for this account; try again later');
    }
    const [user] = await db.select().from(users).where(eq(users.email, input.email)).limit(1);
    const valid = user ? await verifyPassword(user.passwordHash, input.password) : false;
    if (!user || !valid) {
      await consume(rateLimits.authAccount, input.email);
      throw new HttpError(401, 'wrong_credentials', 'That e-mail and password do not match an account');
    }
    await rateLimits.authAccount.delete(input.email);
    await rotateSession(req, res, user.id);
    res.json(await me(user));
  });

  router.post('/auth/sign-out', requireUser, async (req, res) => {
    if (res.locals.session) await auth.invalidateSession(res.locals.session.id);
    setSessionCookie(auth, req, res, null);
    res.status(204).end();
  });

  /** Ends every session of this account (other browsers and phones included), then this one's cookie. */
  router.post('/auth/sign-out-everywhere', requireUser, async (req, res) => {
    await auth.invalidateUserSessions(res.locals.user!.id);
    setSessionCookie(auth, req, res, null);
    res.status(204).end();
  });

  // Public: answers 200 either way, so a signed-out browser sees no failed request.
  router.get('/session', async (_req, res) => {
    res.json({ me: res.locals.user ? await me(res.locals.user) : null });
  });

  /** Ends any session this browser already had, so sign-in always yields a new id. */
  async function rotateSession(req: Parameters<typeof setSessionCookie>[1], res: Parameters<typeof setSessionCookie>[2], userId: string) {
    if (res.locals.session) await auth.invalidateSession(res.locals.session.id);
    const session = await auth.createSession(userId, {});
    setSessionCookie(auth, req, res, session.id);
  }

  return router;
}
