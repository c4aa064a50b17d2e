import { drizzle } from 'drizzle-orm/postgres-js';
import postgres, { type Sql } from 'postgres';
import * as schema from './schema';

/**
 * How a query learns that its pooled connection was ended under it: PostgreSQL's "terminating
 * connection due to administrator command" (57P01, sent to every connection by a restart or
 * pg_terminate_backend) and crash shutdown (57P02), or the socket closing or resetting.
 */
const ENDED_CONNECTION_CODES = new Set(['57P01', '57P02', 'CONNECTION_CLOSED', 'ECONNRESET', 'EPIPE']);

export function isEndedConnection(error: unknown): boolean {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' && ENDED_CONNECTION_CODES.has(code);
}

/** Reads being retried at once per process, each on a connection of its own (so up to `max` + this). */
export const FRESH_RETRY_CONNECTIONS = 2;

type Unsafe = (query: string, params?: unknown[], options?: unknown) => PromiseLike<unknown> & { values: () => PromiseLike<unknown> };

/**
 * The pool as the ORM sees it: a statement outside a transaction that only reads (it starts with
 * SELECT) and fails because its connection was ended is sent once more, on a connection opened
 * for it. Not on the pool: a restart ends every pooled connection at once, and the next one the
 * pool hands out may be ended too without the driver having noticed yet. Writes and transactions
 * are never repeated here: one may have reached the database, and the client resends it under
 * its key instead. The driver's queries are lazy (sent when awaited), so each attempt is a new
 * query object.
 */
function retryingReads(client: Sql, fresh: <T>(run: (sql: Sql) => PromiseLike<T>) => Promise<T>): Sql {
  const unsafe = client.unsafe.bind(client) as Unsafe;
  const wrapped = (query: string, params?: unknown[], options?: unknown) => {
    if (!/^\s*select\b/i.test(query)) return unsafe(query, params, options);
    let asValues = false;
    let settled: Promise<unknown> | undefined;
    const run = (on: Unsafe) => {
      const pending = on(query, params, options);
      return asValues ? pending.values() : pending;
    };
    const settle = () =>
      (settled ??= (async () => {
        try {
          return await run(unsafe);
        } catch (error) {
          if (!isEndedConnection(error)) throw error;
          return fresh((sql) => run(sql.unsafe.bind(sql) as Unsafe));
        }
      })());
    const pending = {
      values() {
        asValues = true;
        return pending;
      },
      then: (onFulfilled?: (v: unknown) => unknown, onRejected?: (e: unknown) => unknown) => settle().then(onFulfilled, onRejected),
      catch: (onRejected?: (e: unknown) => unknown) => settle().catch(onRejected),
      finally: (onFinally?: () => void) => settle().finally(onFinally),
    };
    return pending;
  };
  return new Proxy(client, { get: (target, key, receiver) => (key === 'unsafe' ? wrapped : Reflect.get(target, key, receiver)) });
}

/** At most `slots` callers run at once; the rest wait their turn in order. */
function limited(slots: number) {
  let running = 0;
  const waiting: Array<() => void> = [];
  return async <T>(task: () => Promise<T>): Promise<T> => {
    if (running >= slots) await new Promise<void>((resolve) => waiting.push(resolve));
    running += 1;
    try {
      return await task();
    } finally {
      running -= 1;
      waiting.shift()?.();
    }
  };
}

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
  const settings = {
    max: options.max ?? 10,
    connect_timeout: CONNECT_TIMEOUT_S,
    idle_timeout: 30,
    // The driver's default waits up to 20 s (3^retries / 100 s) before each new connection attempt
    // once PostgreSQL has refused a few, and a request queued behind that wait hangs. A short,
    // capped pause keeps failures fast and reconnects within half a second of PostgreSQL's return.
    backoff: (retries: number) => Math.min(0.05 * retries, 0.5),
    connection: { statement_timeout: statementTimeout, lock_timeout: Math.min(statementTimeout, 10_000) },
    onnotice: () => {},
  };
  const client = postgres(url, settings);
  const slot = limited(FRESH_RETRY_CONNECTIONS);
  const fresh = <T>(run: (sql: Sql) => PromiseLike<T>) =>
    slot(async () => {
      const own = postgres(url, { ...settings, max: 1 });
      // The same value parsers as the pool (the ORM replaced the date ones there with its own).
      Object.assign(own.options.parsers, client.options.parsers);
      Object.assign(own.options.serializers, client.options.serializers);
      try {
        return await run(own);
      } finally {
        await own.end({ timeout: 1 });
      }
    });
  const db = drizzle(retryingReads(client, fresh), { schema });
  return { db, client, close: () => client.end({ timeout: 5 }) };
}
