import { meSchema, type Me } from '@/shared/schemas/auth';
import type { Database } from '../../db/client';
import { collectionsOf } from './collections';

/** The signed-in person and their collections, as `GET /api/session` and the app's page carry them. */
export async function describeMe(db: Database, user: { id: string; email: string; displayName: string }): Promise<Me> {
  return meSchema.parse({ user: { id: user.id, email: user.email, displayName: user.displayName }, collections: await collectionsOf(db, user.id) });
}
