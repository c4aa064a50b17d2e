import { eq } from 'drizzle-orm';
import { Router } from 'express';
import { signInInputSchema, signUpConfirmedSchema, signUpInputSchema, signUpRequestedSchema } from '@/shared/schemas/auth';
import { confirmSignUpInputSchema } from '@/shared/schemas/mail';
import { users } from '../../db/schema';
import { dummyPasswordHash, hashPassword, verifyPassword } from '../auth';
import type { AppContext } from '../context';
import { HttpError } from '../errors';
import { requireUser } from '../middleware/access';
import { beginSignIn, consume, limitByIp } from '../middleware/rate-limit';
import { setSessionCookie } from '../middleware/session';
import { isCommonPassword } from '../passwords';
import { describeMe } from '../services/me';
import { notifySignInPaused } from '../services/sign-in-notice';
import { confirmSignUp, requestSignUp } from '../services/sign-up';
import { parse } from '../validate';

export function authRoutes(ctx: AppContext): Router {
  const { db, auth, rateLimits, mailer, logger } = ctx;
  const router = Router();

  const me = (user: { id: string; email: string; displayName: string }) => describeMe(db, user);

  /**
   * Answers 202 with the same body for an address that is new and one that already has an
   * account, after the same work (the password is hashed either way); the lookup and the mail
   * (a link that creates the account, or a note that one exists) follow the answer.
   */
  router.post('/auth/sign-up', limitByIp(rateLimits.authIp), async (req, res) => {
    const input = parse(signUpInputSchema, req.body);
    await consume(rateLimits.mailAccount, `sign-up:${input.email}`);
    if (isCommonPassword(input.password)) {
      throw new HttpError(400, 'invalid_input', 'Some fields need attention', [
        { field: 'password', reason: 'This password is on a list of commonly used passwords; choose another' },
      ]);
    }
    const passwordHash = await hashPassword(input.password);
    requestSignUp(db, mailer, { email: input.email, displayName: input.displayName, passwordHash, next: input.next }).catch((error: unknown) =>
      logger.error({ err: error }, 'sign-up mail failed'),
    );
    res.status(202).json(
      signUpRequestedSchema.parse({
        message: `Check your mail: a link to finish creating your account is on its way to ${input.email}`,
        email: input.email,
      }),
    );
  });

  /** The mailed link's page sends its token here: the account is made and signed in. */
  router.post('/auth/sign-up/confirm', limitByIp(rateLimits.mailIp), async (req, res) => {
    const { token } = parse(confirmSignUpInputSchema, req.body);
    const { user, next } = await confirmSignUp(db, token);
    await rotateSession(req, res, user.id);
    res.status(201).json(signUpConfirmedSchema.parse({ ...(await me(user)), next }));
  });

  router.post('/auth/sign-in', async (req, res) => {
    const input = parse(signInInputSchema, req.body);
    const attempt = await beginSignIn(rateLimits, input.email, req.ip ?? 'unknown', () => {
      notifySignInPaused(db, mailer, input.email).catch((error: unknown) => logger.error({ err: error }, 'sign-in pause notice failed'));
    });
    const [user] = await db.select().from(users).where(eq(users.email, input.email)).limit(1);
    // An unknown address costs the same hash check as a wrong password, so timing tells nothing.
    const valid = await verifyPassword(user?.passwordHash ?? (await dummyPasswordHash()), input.password);
    if (!user || !valid) throw new HttpError(401, 'wrong_credentials', 'That e-mail and password do not match an account');
    await attempt.succeeded();
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
