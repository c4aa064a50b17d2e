import { sql } from 'drizzle-orm';
import { createDatabase } from '../../../db/client';

export function testDatabaseUrl(): string {
  const url = process.env.TEST_DATABASE_URL;
  if (!url) throw new Error('TEST_DATABASE_URL is not set: run the API tests through npm test');
  return url;
}

let database: ReturnType<typeof createDatabase> | undefined;

/** One pool per test file, closed after the file. */
export function testDb() {
  database ??= createDatabase(testDatabaseUrl(), { max: 5 });
  return database.db;
}

export async function truncateAll(): Promise<void> {
  const db = testDb();
  const rows = await db.execute<{ tablename: string }>(
    sql`select tablename from pg_tables where schemaname = 'public'`,
  );
  const names = rows.map((r) => `"${r.tablename}"`).join(', ');
  if (names) await db.execute(sql.raw(`truncate ${names} restart identity cascade`));
}

/** Row counts of every table, for asserting that a refused request wrote nothing. */
export async function rowCounts(): Promise<Record<string, number>> {
  const db = testDb();
  const tables = await db.execute<{ tablename: string }>(
    sql`select tablename from pg_tables where schemaname = 'public' order by tablename`,
  );
  const counts: Record<string, number> = {};
  for (const { tablename } of tables) {
    const [row] = await db.execute<{ n: number }>(sql.raw(`select count(*)::int as n from "${tablename}"`));
    counts[tablename] = row.n;
  }
  return counts;
}

export async function closeTestDatabase(): Promise<void> {
  await database?.close();
  database = undefined;
}
