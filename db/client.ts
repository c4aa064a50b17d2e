import { drizzle } from 'drizzle-orm/postgres-js';
import postgres from 'postgres';
import * as schema from './schema';

export type Database = ReturnType<typeof createDatabase>['db'];

/** Seconds a new connection may take before the request fails (503 `database_unavailable`). */
export const CONNECT_TIMEOUT_S = 5;
/** Longest a single statement may run on the server's connections; the slowest normal one takes well under a second. */
export const STATEMENT_TIMEOUT_MS = 30_000;

/**
 * Opens a connection pool. `connect_timeout` keeps requests from hanging when
 * PostgreSQL is down: they fail within seconds and the pool reconnects by itself later.
 * `statement_timeout` (set per connection) ends a statement stuck behind a lock or a
 * stalled database instead of holding a pool slot for ever; `lock_timeout` does the same
 * for waits on row locks. scripts/faults/run.ts checks both fail-fast paths.
 */
export function createDatabase(url: string, options: { max?: number; statementTimeoutMs?: number } = {}) {
  const statementTimeout = options.statementTimeoutMs ?? STATEMENT_TIMEOUT_MS;
  const client = postgres(url, {
    max: options.max ?? 10,
    connect_timeout: CONNECT_TIMEOUT_S,
    idle_timeout: 30,
    // The driver's default waits up to 20 s (3^retries / 100 s) before each new connection attempt
    // once PostgreSQL has refused a few, and a request queued behind that wait hangs. A short,
    // capped pause keeps failures fast and reconnects within half a second of PostgreSQL's return.
    backoff: (retries: number) => Math.min(0.05 * retries, 0.5),
    connection: { statement_timeout: statementTimeout, lock_timeout: Math.min(statementTimeout, 10_000) },
    onnotice: () => {},
  });
  const db = drizzle(client, { schema });
  return { db, client, close: () => client.end({ timeout: 5 }) };
}
