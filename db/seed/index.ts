import { sql } from 'drizzle-orm';
import { generateIdFromEntropySize } from 'lucia';
import { hashPassword } from '../../server/auth';
import type { Database } from '../client';
import { collections, memberships, users } from '../schema';
import { DEMO_ACCOUNTS, DEMO_COLLECTION_NAME, DEMO_PASSWORD } from './demo-accounts';

/**
 * Seeds the invented demo collection when the database has no users yet; a database
 * that already holds anyone's records is never touched.
 */
export async function seedDemo(db: Database, { log }: { log: (line: string) => void }): Promise<boolean> {
  const [{ count }] = await db.select({ count: sql<number>`count(*)::int` }).from(users);
  if (count > 0) {
    log('database already has accounts; demo data not added');
    printAccounts(log);
    return false;
  }
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  await db.transaction(async (tx) => {
    const [collection] = await tx
      .insert(collections)
      .values({ name: DEMO_COLLECTION_NAME, seasonStartMonth: 3, units: 'mm' })
      .returning({ id: collections.id });
    for (const account of DEMO_ACCOUNTS) {
      const id = generateIdFromEntropySize(10);
      await tx.insert(users).values({ id, email: account.email, displayName: account.displayName, passwordHash });
      await tx.insert(memberships).values({ collectionId: collection.id, userId: id, role: account.role });
    }
  });
  log(`demo collection "${DEMO_COLLECTION_NAME}" created`);
  printAccounts(log);
  return true;
}

function printAccounts(log: (line: string) => void): void {
  for (const account of DEMO_ACCOUNTS) {
    log(`demo ${account.role.padEnd(6)} ${account.email}  password: ${DEMO_PASSWORD}`);
  }
}

if (require.main === module) {
  import('../client').then(async ({ createDatabase }) => {
    const { databaseUrl } = await import('../url');
    const database = createDatabase(databaseUrl());
    await seedDemo(database.db, { log: console.log });
    await database.close();
  });
}
