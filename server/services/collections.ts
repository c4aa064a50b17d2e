import { and, asc, eq } from 'drizzle-orm';
import type { Collection, Member } from '@/shared/schemas/collections';
import type { CollectionSummary, Role } from '@/shared/schemas/auth';
import type { Database } from '../../db/client';
import { collections, memberships, users } from '../../db/schema';
import { HttpError, notFound } from '../errors';

type Executor = Database | Parameters<Parameters<Database['transaction']>[0]>[0];

export async function createCollectionFor(
  tx: Executor,
  userId: string,
  values: { name: string; seasonStartMonth?: number; units?: 'mm' | 'in' },
): Promise<string> {
  const [row] = await tx.insert(collections).values(values).returning({ id: collections.id });
  await tx.insert(memberships).values({ collectionId: row.id, userId, role: 'owner' });
  return row.id;
}

export async function collectionsOf(db: Database, userId: string): Promise<CollectionSummary[]> {
  return db
    .select({ id: collections.id, name: collections.name, role: memberships.role })
    .from(memberships)
    .innerJoin(collections, eq(collections.id, memberships.collectionId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(collections.createdAt), asc(collections.name));
}

export async function getCollection(db: Database, id: string, role: Role): Promise<Collection> {
  const [row] = await db.select().from(collections).where(eq(collections.id, id)).limit(1);
  if (!row) throw notFound('That collection');
  return {
    id: row.id,
    name: row.name,
    seasonStartMonth: row.seasonStartMonth,
    units: row.units,
    latitude: row.latitude,
    longitude: row.longitude,
    role,
  };
}

export async function listMembers(db: Database, collectionId: string): Promise<Member[]> {
  return db
    .select({ userId: users.id, email: users.email, displayName: users.displayName, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.collectionId, collectionId))
    .orderBy(asc(memberships.createdAt));
}

/**
 * Changes or removes a membership. Runs in one transaction holding a lock on the
 * collection's owner rows, so two owners demoting each other at once cannot leave none.
 */
export async function changeMembership(
  db: Database,
  collectionId: string,
  userId: string,
  change: { role: Role } | 'remove',
): Promise<void> {
  await db.transaction(async (tx) => {
    const owners = await tx
      .select({ userId: memberships.userId })
      .from(memberships)
      .where(and(eq(memberships.collectionId, collectionId), eq(memberships.role, 'owner')))
      .for('update');
    const [target] = await tx
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.collectionId, collectionId), eq(memberships.userId, userId)))
      .for('update');
    if (!target) throw notFound('That member');
    const losesOwner = target.role === 'owner' && (change === 'remove' || change.role !== 'owner');
    if (losesOwner && owners.length <= 1) {
      throw new HttpError(409, 'last_owner', 'A collection needs at least one owner; make someone else owner first');
    }
    const where = and(eq(memberships.collectionId, collectionId), eq(memberships.userId, userId));
    if (change === 'remove') await tx.delete(memberships).where(where);
    else await tx.update(memberships).set({ role: change.role }).where(where);
  });
}
