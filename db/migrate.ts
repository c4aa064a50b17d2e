import path from 'node:path';
import { sql } from 'drizzle-orm';
import { migrate } from 'drizzle-orm/postgres-js/migrator';
import { createDatabase } from './client';
import { databaseUrl } from './url';

/** Any fixed number of our own: the advisory lock that lets one process migrate at a time. */
const MIGRATION_LOCK = 7_310_026;

/**
 * Applies every migration in `migrations/`; re-running is a no-op. Several servers starting at
 * once against one database take turns: each holds a PostgreSQL advisory lock (on its single
 * connection) while it migrates, and the later ones find nothing left to do.
 */
export async function runMigrations(url: string): Promise<void> {
  const { db, close } = createDatabase(url, { max: 1 });
  try {
    await db.execute(sql`select pg_advisory_lock(${MIGRATION_LOCK})`);
    try {
      await migrate(db, { migrationsFolder: path.join(__dirname, '..', 'migrations') });
    } finally {
      await db.execute(sql`select pg_advisory_unlock(${MIGRATION_LOCK})`);
    }
  } finally {
    await close();
  }
}

if (require.main === module) {
  runMigrations(databaseUrl())
    .then(() => console.log('migrations applied'))
    .catch((error) => {
      console.error(error);
      process.exit(1);
    });
}
