import { generateIdFromEntropySize } from 'lucia';
import { createAuth, hashPassword } from '../../server/auth';
import type { Database } from '../../db/client';
import { collections, memberships, users } from '../../db/schema';
import type { Role } from '@/shared/schemas/auth';

let counter = 0;

/** A sign-up body that passes every rule; override any field. */
export function buildSignUp(overrides: Partial<{ email: string; password: string; displayName: string }> = {}) {
  counter += 1;
  return {
    email: `grower${counter}-${Date.now()}@example.test`,
    password: 'pseudobulb-ladder-77',
    displayName: `Grower ${counter}`,
    ...overrides,
  };
}

/** A user row written directly (no HTTP), with a cheap placeholder hash unless a password is given. */
export async function insertUser(db: Database, overrides: Partial<{ email: string; displayName: string; password: string }> = {}) {
  counter += 1;
  const id = generateIdFromEntropySize(10);
  const email = overrides.email ?? `member${counter}-${id}@example.test`;
  const passwordHash = overrides.password ? await hashPassword(overrides.password) : 'no-password-set';
  await db.insert(users).values({ id, email, displayName: overrides.displayName ?? `Member ${counter}`, passwordHash });
  return { id, email };
}

/** A session cookie for a user, minted through Lucia as sign-in would. */
export async function sessionCookieFor(db: Database, userId: string): Promise<string> {
  const auth = createAuth(db);
  const session = await auth.createSession(userId, {});
  return `${auth.sessionCookieName}=${session.id}`;
}

/** A collection with one member of each role and an outsider who belongs to another collection. */
export async function buildCollectionWithMembers(db: Database, name = 'Test bench') {
  const [collection] = await db.insert(collections).values({ name }).returning({ id: collections.id });
  const people = {} as Record<Role | 'outsider', { id: string; email: string; cookie: string }>;
  for (const role of ['owner', 'grower', 'viewer'] as const) {
    const user = await insertUser(db, { displayName: `${role} of ${name}` });
    await db.insert(memberships).values({ collectionId: collection.id, userId: user.id, role });
    people[role] = { ...user, cookie: await sessionCookieFor(db, user.id) };
  }
  const outsider = await insertUser(db, { displayName: 'Outsider' });
  const [elsewhere] = await db.insert(collections).values({ name: 'Somewhere else' }).returning({ id: collections.id });
  await db.insert(memberships).values({ collectionId: elsewhere.id, userId: outsider.id, role: 'owner' });
  people.outsider = { ...outsider, cookie: await sessionCookieFor(db, outsider.id) };
  return { collectionId: collection.id, otherCollectionId: elsewhere.id, people };
}
