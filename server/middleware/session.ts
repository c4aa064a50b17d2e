import { and, eq, sql } from 'drizzle-orm';
import type { Request, RequestHandler, Response } from 'express';
import type { Session, User } from 'lucia';
import type { Role } from '@/shared/schemas/auth';
import type { Database } from '../../db/client';
import { memberships, sessions, users } from '../../db/schema';
import { SESSION_LIFETIME, userAttributes, type Auth } from '../auth';
import { collectionIdSchema } from './access';

declare global {
  namespace Express {
    interface Locals {
      user?: User;
      session?: Session;
      /**
       * The signed-in user's membership of the collection named in the path, read in the same
       * query as the session (null: not a member). `requireRole` uses it for that collection.
       */
      collectionAccess?: { collectionId: string; membership: { collectionId: string; userId: string; role: Role } | null };
    }
  }
}

/** Writes Lucia's cookie, marking it Secure whenever the request arrived over HTTPS. */
export function setSessionCookie(auth: Auth, req: Request, res: Response, sessionId: string | null): void {
  const cookie = sessionId ? auth.createSessionCookie(sessionId) : auth.createBlankSessionCookie();
  const { attributes } = cookie;
  res.cookie(cookie.name, cookie.value, {
    httpOnly: attributes.httpOnly ?? true,
    sameSite: 'lax',
    secure: req.secure,
    path: attributes.path ?? '/',
    maxAge: attributes.maxAge !== undefined ? attributes.maxAge * 1000 : undefined,
  });
}

export interface ValidatedSession {
  session: Session;
  user: User;
  /** The user's membership of `collectionId` (null when not a member, or no collection asked for). */
  membership: { collectionId: string; userId: string; role: Role } | null;
}

/**
 * Checks a session id as Lucia's `validateSession` does, and reads the user's membership of a
 * collection in the same round trip: one prepared query joins the session, its user and the
 * membership, so a collection route costs one query before its own work instead of two.
 *
 * The rules are Lucia's (lucia/dist/core.js, 3.2): an unknown id is no session; an expired one is
 * deleted and refused; one past half its lifetime is extended to a full `SESSION_LIFETIME` from
 * now and marked `fresh` (its cookie is then renewed). Nothing is cached between requests, so a
 * sign-out on any server process ends the session at once. tests/api/sessions.test.ts holds it
 * to Lucia's answers.
 */
export function sessionValidator(auth: Auth, db: Database) {
  const lookup = db
    .select({
      sessionId: sessions.id,
      userId: sessions.userId,
      expiresAt: sessions.expiresAt,
      email: users.email,
      displayName: users.displayName,
      memberCollectionId: memberships.collectionId,
      role: memberships.role,
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .leftJoin(memberships, and(eq(memberships.userId, sessions.userId), eq(memberships.collectionId, sql.placeholder('collectionId'))))
    .where(eq(sessions.id, sql.placeholder('sessionId')))
    .prepare('session_user_membership');

  return async (sessionId: string, collectionId: string | null): Promise<ValidatedSession | null> => {
    const [row] = await lookup.execute({ sessionId, collectionId });
    if (!row) return null;
    if (!(Date.now() < row.expiresAt.getTime())) {
      await auth.invalidateSession(row.sessionId);
      return null;
    }
    const session: Session = { id: row.sessionId, userId: row.userId, fresh: false, expiresAt: row.expiresAt };
    if (!(Date.now() < row.expiresAt.getTime() - SESSION_LIFETIME.milliseconds() / 2)) {
      session.fresh = true;
      session.expiresAt = new Date(Date.now() + SESSION_LIFETIME.milliseconds());
      await db.update(sessions).set({ expiresAt: session.expiresAt }).where(eq(sessions.id, row.sessionId));
    }
    const user: User = { ...userAttributes(row), id: row.userId };
    const membership = row.memberCollectionId !== null && row.role !== null ? { collectionId: row.memberCollectionId, userId: row.userId, role: row.role } : null;
    return { session, user, membership };
  };
}

export type SessionValidator = ReturnType<typeof sessionValidator>;

/** The collection id of a `/collections/:collectionId/…` path (as the router decodes it), when it is a uuid. */
function collectionInPath(path: string): string | null {
  const segment = /^\/collections\/([^/]+)/.exec(path)?.[1];
  if (!segment) return null;
  let decoded: string;
  try {
    decoded = decodeURIComponent(segment);
  } catch {
    return null;
  }
  const parsed = collectionIdSchema.safeParse(decoded);
  return parsed.success ? parsed.data : null;
}

/**
 * The request's session from its cookie, or null: a cookie whose session is gone is cleared, and
 * a session near expiry is extended and its cookie renewed. Throws when the database cannot say.
 */
export async function readSession(auth: Auth, validate: SessionValidator, req: Request, res: Response, collectionId: string | null): Promise<ValidatedSession | null> {
  const sessionId = auth.readSessionCookie(req.headers.cookie ?? '');
  if (!sessionId) return null;
  const found = await validate(sessionId, collectionId);
  if (!found) {
    setSessionCookie(auth, req, res, null);
    return null;
  }
  if (found.session.fresh) setSessionCookie(auth, req, res, found.session.id);
  return found;
}

/**
 * Reads the session cookie (`readSession`). On a collection's path, the membership of that
 * collection comes with it (`collectionAccess`).
 */
export function sessionMiddleware(auth: Auth, validate: SessionValidator): RequestHandler {
  return async (req, res, next) => {
    const collectionId = collectionInPath(req.path);
    const found = await readSession(auth, validate, req, res, collectionId);
    if (!found) return next();
    res.locals.user = found.user;
    res.locals.session = found.session;
    if (collectionId) res.locals.collectionAccess = { collectionId, membership: found.membership };
    next();
  };
}
