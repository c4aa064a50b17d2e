import type { Request, RequestHandler, Response } from 'express';
import type { Session, User } from 'lucia';
import type { Auth } from '../auth';

declare global {
  namespace Express {
    interface Locals {
      user?: User;
      session?: Session;
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

/** Reads the session cookie; a session near expiry is extended and its cookie renewed. */
export function sessionMiddleware(auth: Auth): RequestHandler {
  return async (req, res, next) => {
    const sessionId = auth.readSessionCookie(req.headers.cookie ?? '');
    if (!sessionId) return next();
    const { session, user } = await auth.validateSession(sessionId);
    if (!session) {
      setSessionCookie(auth, req, res, null);
      return next();
    }
    if (session.fresh) setSessionCookie(auth, req, res, session.id);
    res.locals.user = user;
    res.locals.session = session;
    next();
  };
}
