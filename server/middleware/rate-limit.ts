import type { Request, RequestHandler } from 'express';
import type { Sql } from 'postgres';
import { RateLimiterAbstract, RateLimiterMemory, RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible';
import { getTableName } from 'drizzle-orm';
import { rateLimitCounts } from '../../db/schema';
import { HttpError } from '../errors';

export interface RateLimitSettings {
  /** Attempts per client address per window. */
  perIp: number;
  /** Attempts per account (e-mail address) per window. */
  perAccount: number;
  windowSeconds: number;
}

/** Sign-in and sign-up limits: generous for a person, tight for a password-guessing script. */
export const DEFAULT_AUTH_LIMITS: RateLimitSettings = { perIp: 30, perAccount: 10, windowSeconds: 15 * 60 };

/**
 * The counters' table when they are kept in PostgreSQL: `rateLimitCounts` in db/schema.ts, made
 * by a migration in the shape rate-limiter-flexible expects (key, points, expire in epoch ms).
 * Every limiter shares it: keys carry the limiter's prefix.
 */
export const RATE_LIMIT_TABLE = getTableName(rateLimitCounts);

/**
 * The driver rate-limiter-flexible expects (`pg`'s `query({ text, values })` → `{ rows }`), on the
 * project's own `postgres` client, so no second PostgreSQL driver is needed.
 */
function pgStyle(sql: Sql) {
  return {
    query: async ({ text, values }: { text: string; values?: unknown[] }) => ({
      rows: await sql.unsafe(text, (values ?? []) as never[]),
    }),
  };
}

/**
 * One budget per limiter. Without `store` the counts live in this process's memory (tests, one
 * server). With `store` (server/index.ts) they live in PostgreSQL, so every server process behind
 * one database shares them; while the database cannot be reached each process falls back to its
 * own memory counts rather than refusing or waving everyone through.
 */
export function createRateLimits(settings: RateLimitSettings = DEFAULT_AUTH_LIMITS, store?: { sql: Sql }) {
  const make = (keyPrefix: string, points: number): RateLimiterAbstract => {
    const options = { duration: settings.windowSeconds, points, keyPrefix };
    if (!store) return new RateLimiterMemory(options);
    return new RateLimiterPostgres({
      ...options,
      storeClient: pgStyle(store.sql),
      storeType: 'pool',
      tableName: RATE_LIMIT_TABLE,
      tableCreated: true,
      insuranceLimiter: new RateLimiterMemory(options),
    });
  };
  return {
    authIp: make('auth-ip', settings.perIp),
    authAccount: make('auth-account', settings.perAccount),
    // Routes that send mail (invitations, password reset): the same budget, counted apart from sign-in.
    mailIp: make('mail-ip', settings.perIp),
    mailAccount: make('mail-account', settings.perAccount),
  };
}

export type RateLimits = ReturnType<typeof createRateLimits>;

function tooMany(result: unknown): HttpError {
  const seconds = result instanceof RateLimiterRes ? Math.ceil(result.msBeforeNext / 1000) : 60;
  return new HttpError(429, 'rate_limited', `Too many attempts; try again in ${Math.max(1, Math.ceil(seconds / 60))} minute(s)`);
}

export async function consume(limiter: RateLimiterAbstract, key: string): Promise<void> {
  try {
    await limiter.consume(key);
  } catch (result) {
    if (result instanceof RateLimiterRes) throw tooMany(result);
    throw result;
  }
}

/** Counts every attempt against the client's address before the route runs. */
export function limitByIp(limiter: RateLimiterAbstract): RequestHandler {
  return async (req: Request, _res, next) => {
    await consume(limiter, req.ip ?? 'unknown');
    next();
  };
}
