import { and, eq, inArray, sql } from 'drizzle-orm';
import { generateIdFromEntropySize } from 'lucia';
import { hashPassword } from '../../server/auth';
import type { Database } from '../client';
import { collections, memberships, plants, users } from '../schema';
import { DEMO_ACCOUNTS, DEMO_COLLECTION_NAME, DEMO_LOCATION, DEMO_PASSWORD } from './demo-accounts';
import { DEMO_SEED, generateCollection } from './generate';
import { insertGenerated } from './insert';

/** Today's date in UTC, 'YYYY-MM-DD': the one place the demo seed reads the clock. */
export function currentUtcDate(): string {
  return new Date().toISOString().slice(0, 10);
}

/**
 * Seeds the invented demo collection when the database has no users yet; a database
 * that already holds anyone's records is never touched. The collection's records (about 40
 * plants, four seasons, the current one in progress as of `today`) come from the
 * deterministic generator with a fixed seed; the grower account made the measurements.
 */
export async function seedDemo(
  db: Database,
  { log, today = currentUtcDate() }: { log: (line: string) => void; today?: string },
): Promise<boolean> {
  const [{ count }] = await db.select({ count: sql<number>`count(*)::int` }).from(users);
  if (count > 0) {
    log('database already has accounts; demo data not added');
    printAccounts(log);
    return false;
  }
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const generated = await db.transaction(async (tx) => {
    const [collection] = await tx
      .insert(collections)
      // An invented spot in the subtropics where Cattleyas summer outdoors and winter fronts bring cold nights.
      .values({ name: DEMO_COLLECTION_NAME, seasonStartMonth: 3, units: 'mm', latitude: DEMO_LOCATION.latitude, longitude: DEMO_LOCATION.longitude })
      .returning({ id: collections.id });
    const idsByRole = new Map<string, string>();
    for (const account of DEMO_ACCOUNTS) {
      const id = generateIdFromEntropySize(10);
      idsByRole.set(account.role, id);
      await tx.insert(users).values({ id, email: account.email, displayName: account.displayName, passwordHash });
      await tx.insert(memberships).values({ collectionId: collection.id, userId: id, role: account.role });
    }
    const generated = generateCollection({ seed: DEMO_SEED, today, plants: 40, seasons: 4 });
    await insertGenerated(tx, collection.id, generated, {
      createdBy: idsByRole.get('grower') ?? null,
      plantsCreatedBy: idsByRole.get('owner') ?? null,
    });
    // The demo grower's own night limit for the Cattleya-type plants on the sheltered shade-house
    // bench: brought in only near 10 °C, as many growers do (the genus default is 13 °C).
    const shadeHouse = generated.areas.find((a) => a.name === 'Shade-house bench');
    if (shadeHouse) {
      await tx
        .update(plants)
        .set({ minNightTempC: 10 })
        .where(and(eq(plants.collectionId, collection.id), eq(plants.areaId, shadeHouse.id), inArray(plants.genus, ['C.', 'Lc.', 'Rlc.', 'Ctt.', 'Gur.'])));
    }
    return generated;
  });
  log(
    `demo collection "${DEMO_COLLECTION_NAME}" created: ${generated.plants.length} plants, ${generated.leads.length} leads, ` +
      `${generated.measurements.length} measurements, seasons ${generated.seasons[0]}–${generated.currentSeason} (as of ${today})`,
  );
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
