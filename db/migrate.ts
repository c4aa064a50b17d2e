import path from 'node:path';
import { migrate } from 'drizzle-orm/postgres-js/migrator';
import { createDatabase } from './client';
import { databaseUrl } from './url';

/** Applies every migration in `migrations/`; re-running is a no-op. */
export async function runMigrations(url: string): Promise<void> {
  const { db, close } = createDatabase(url, { max: 1 });
  try {
    await migrate(db, { migrationsFolder: path.join(__dirname, '..', 'migrations') });
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
