import { and, eq } from 'drizzle-orm';
import type { RequestHandler } from 'express';
import { z } from 'zod';
import type { Role } from '@/shared/schemas/auth';
import type { Database } from '../../db/client';
import { memberships } from '../../db/schema';
import { HttpError, notFound } from '../errors';

declare global {
  namespace Express {
    interface Locals {
      membership?: { collectionId: string; userId: string; role: Role };
    }
  }
}

/** Higher rank may do all that a lower one may. */
const RANK: Record<Role, number> = { viewer: 1, grower: 2, owner: 3 };

export const requireUser: RequestHandler = (_req, res, next) => {
  if (!res.locals.user) return next(new HttpError(401, 'signed_out', 'Sign in to continue'));
  next();
};

/** What a collection id in a path must be (anything else is a 404). */
export const collectionIdSchema = z.uuid();

/** The user's membership of a collection, or null. */
async function membershipOf(db: Database, collectionId: string, userId: string) {
  const [row] = await db
    .select({ collectionId: memberships.collectionId, userId: memberships.userId, role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.collectionId, collectionId), eq(memberships.userId, userId)))
    .limit(1);
  return row ?? null;
}

/**
 * The one access guard for collection routes: anonymous → 401; not a member (or no such
 * collection, or a malformed id) → 404, so the existence of a collection is never revealed;
 * a member below `minimum` → 403.
 */
export function requireRole(db: Database, minimum: Role): RequestHandler {
  return async (req, res, next) => {
    const user = res.locals.user;
    if (!user) return next(new HttpError(401, 'signed_out', 'Sign in to continue'));
    const parsed = collectionIdSchema.safeParse(req.params.collectionId);
    if (!parsed.success) return next(notFound('That collection'));
    // Read with the session when the path named this collection (sessionMiddleware), else now.
    const prefetched = res.locals.collectionAccess;
    const membership =
      prefetched && prefetched.collectionId === parsed.data
        ? prefetched.membership
        : await membershipOf(db, parsed.data, user.id);
    if (!membership) return next(notFound('That collection'));
    if (RANK[membership.role] < RANK[minimum]) {
      return next(new HttpError(403, 'forbidden', `This needs the ${minimum} role in this collection`));
    }
    res.locals.membership = membership;
    next();
  };
}
