import { runMigrations } from '../../db/migrate';
import { testDatabaseUrl } from './support/database';

/** Migrates the test database once per run (re-running is a no-op). */
export default async function setup() {
  await runMigrations(testDatabaseUrl());
}
